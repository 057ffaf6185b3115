import { betterAuth } from 'better-auth';
import { organization } from 'better-auth/plugins';
import { createAccessControl } from 'better-auth/plugins/access';
import { defaultStatements } from 'better-auth/plugins/organization/access';
import { createPool } from 'mysql2/promise';
import { parseDatabaseUrl } from '../db-config.ts';
import { env } from '../env.ts';
import { ROLES, accessStatements, rolePermissions, type Role } from '../../lib/auth/permissions.ts';
import { enqueueMail } from '../mail/outbox.ts';
import { invitationMail, passwordResetMail } from '../mail/templates.ts';
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

function createAuth() {
  const e = env();
  const { ac, roles } = buildAccessControl();
  const pool = createPool({ ...parseDatabaseUrl(e.DATABASE_URL), timezone: 'Z', connectionLimit: 10, connectTimeout: 5000 });
  const appOrigin = new URL(e.APP_URL).origin;
  const extraOrigins = (process.env.TRUSTED_ORIGINS ?? '').split(',').map((s) => s.trim()).filter(Boolean);

  return betterAuth({
    appName: 'Tallypost',
    baseURL: e.APP_URL,
    basePath: '/api/auth',
    secret: e.AUTH_SECRET,
    database: pool,
    trustedOrigins: [appOrigin, ...extraOrigins],
    emailAndPassword: {
      enabled: true,
      minPasswordLength: 10,
      maxPasswordLength: 128,
      autoSignIn: true,
      revokeSessionsOnPasswordReset: true,
      resetPasswordTokenExpiresIn: 3600,
      sendResetPassword: async ({ user, url }) => {
        await enqueueMail(db(), { organizationId: null, ...passwordResetMail({ to: user.email, name: user.name, url }) });
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
        allowUserToCreateOrganization: true,
        invitationExpiresIn: 7 * 24 * 3600,
        cancelPendingInvitationsOnReInvite: true,
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
