import { betterAuth } from 'better-auth';
import { APIError } from 'better-auth/api';
import { organization } from 'better-auth/plugins';
import { createAccessControl } from 'better-auth/plugins/access';
import { defaultStatements } from 'better-auth/plugins/organization/access';
import { createPool } from 'mysql2/promise';
import { parseDatabaseUrl } from '../db-config.ts';
import { env } from '../env.ts';
import { ROLES, accessStatements, isRole, rolePermissions, type Role } from '../../lib/auth/permissions.ts';
import { enqueueMail } from '../mail/outbox.ts';
import { invitationMail, passwordResetMail, signUpAttemptMail, verifyEmailMail } from '../mail/templates.ts';
import { rememberCompany } from '../services/companies.ts';
import { db } from '../db.ts';

/** Header the app sets from the socket address; a client's own value is always dropped. */
export const CLIENT_IP_HEADER = 'x-tallypost-client-ip';

function buildAccessControl() {
  const statements = { ...defaultStatements, ...accessStatements() } as unknown as Record<string, string[]>;
  const ac = createAccessControl(statements);
  // Custom roles replace better-auth's built-in ones, so owner is spelled out here with
  // the organization powers (members, invitations, the company itself) that only it holds.
  const orgPowers: Record<Role, Record<string, string[]>> = {
    owner: {
      organization: ['update', 'delete'],
      member: ['create', 'update', 'delete'],
      invitation: ['create', 'cancel'],
      team: [],
      ac: ['read'],
    },
    bookkeeper: { organization: [], member: [], invitation: [], team: [], ac: ['read'] },
    estimator: { organization: [], member: [], invitation: [], team: [], ac: ['read'] },
    crew_lead: { organization: [], member: [], invitation: [], team: [], ac: ['read'] },
  };
  const roles = Object.fromEntries(
    ROLES.map((role) => [role, ac.newRole({ ...orgPowers[role], ...rolePermissions(role) } as never)]),
  ) as unknown as Record<Role, ReturnType<typeof ac.newRole>>;
  return { ac, roles };
}

function refuse(message: string): never {
  throw new APIError('FORBIDDEN', { message });
}

function createAuth() {
  const e = env();
  const { ac, roles } = buildAccessControl();
  const pool = createPool({ ...parseDatabaseUrl(e.DATABASE_URL), timezone: 'Z', connectionLimit: 10, connectTimeout: 5000 });
  const appOrigin = new URL(e.APP_URL).origin;

  return betterAuth({
    appName: 'Tallypost',
    baseURL: e.APP_URL,
    basePath: '/api/auth',
    secret: e.AUTH_SECRET,
    database: pool,
    trustedOrigins: [appOrigin, ...e.TRUSTED_ORIGINS],
    emailAndPassword: {
      enabled: true,
      minPasswordLength: 10,
      maxPasswordLength: 128,
      // Nobody is signed in before their address is confirmed: sign-up answers the same for a
      // new and a known address (better-auth's generic reply), and an account made with
      // someone else's address is never usable.
      requireEmailVerification: true,
      revokeSessionsOnPasswordReset: true,
      onExistingUserSignUp: async ({ user }) => {
        await enqueueMail(db(), {
          organizationId: null,
          ...signUpAttemptMail({ to: user.email, name: user.name, confirmed: user.emailVerified, signInUrl: `${e.APP_URL}/sign-in`, resetUrl: `${e.APP_URL}/forgot-password` }),
        });
      },
      resetPasswordTokenExpiresIn: 3600,
      sendResetPassword: async ({ user, url }) => {
        await enqueueMail(db(), { organizationId: null, ...passwordResetMail({ to: user.email, name: user.name, url }) });
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      // An unconfirmed account that signs in with the right password gets a fresh link.
      sendOnSignIn: true,
      autoSignInAfterVerification: true,
      expiresIn: 24 * 3600,
      sendVerificationEmail: async ({ user, url }) => {
        await enqueueMail(db(), { organizationId: null, ...verifyEmailMail({ to: user.email, name: user.name, url }) });
      },
    },
    session: {
      expiresIn: 7 * 24 * 3600,
      updateAge: 24 * 3600,
    },
    rateLimit: {
      enabled: true,
      storage: 'database',
      window: 60,
      max: 300,
      customRules: {
        '/sign-in/email': { window: e.SIGN_IN_RATE_WINDOW, max: e.SIGN_IN_RATE_MAX },
        '/sign-up/email': { window: 60, max: 30 },
        '/request-password-reset': { window: 300, max: 5 },
      },
    },
    advanced: {
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
      useSecureCookies: appOrigin.startsWith('https:'),
      defaultCookieAttributes: { httpOnly: true, sameSite: 'lax' },
    },
    plugins: [
      organization({
        ac,
        roles,
        creatorRole: 'owner',
        // Companies are made and ended only through the app (services/companies.ts makes one
        // with its settings in one transaction); members change role or leave only through
        // services/members.ts, which keeps the last owner. These refusals hold for any caller.
        allowUserToCreateOrganization: false,
        disableOrganizationDeletion: true,
        requireEmailVerificationOnInvitation: true,
        invitationExpiresIn: 7 * 24 * 3600,
        cancelPendingInvitationsOnReInvite: true,
        organizationHooks: {
          beforeCreateOrganization: async () => refuse('Companies are created through Tallypost.'),
          beforeDeleteOrganization: async () => refuse('Companies are not deleted this way.'),
          beforeUpdateMemberRole: async () => refuse('Roles are changed under Members.'),
          beforeRemoveMember: async () => refuse('Members are removed under Members.'),
          beforeCreateInvitation: async ({ invitation }) => {
            if (!isRole(invitation.role)) refuse('Choose one role.');
          },
          beforeAcceptInvitation: async ({ invitation, user }) => {
            if (!isRole(invitation.role)) refuse('This invitation is not valid any more.');
            if (!user.emailVerified) refuse('Confirm your e-mail address first.');
          },
          afterAcceptInvitation: async ({ member, user }) => {
            await rememberCompany(db(), user.id, member.organizationId);
          },
        },
        sendInvitationEmail: async (data) => {
          const url = `${e.APP_URL}/accept-invite/${encodeURIComponent(data.id)}`;
          await enqueueMail(db(), {
            organizationId: data.organization.id,
            ...invitationMail({
              to: data.email,
              company: data.organization.name,
              inviter: data.inviter.user.name,
              role: data.role as Role,
              url,
            }),
          });
        },
      }),
    ],
  });
}

export type Auth = ReturnType<typeof createAuth>;
let instance: Auth | undefined;

export function auth(): Auth {
  instance ??= createAuth();
  return instance;
}
