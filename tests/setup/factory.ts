import { randomBytes } from 'node:crypto';
import { Client } from './client.ts';
import { mailTo } from './mail.ts';
import type { Role } from '../../src/lib/auth/permissions.ts';

export const PASSWORD = 'correct-horse-fence-1';

export function uniqueEmail(tag: string): string {
  return `${tag}.${randomBytes(5).toString('hex')}@tests.example`;
}

export interface TestCompany {
  id: string;
  name: string;
  owner: Client;
  bookkeeper: Client;
  estimator: Client;
  crew_lead: Client;
  emails: Record<Role, string>;
  userIds: Record<Role, string>;
  as(role: Role): Client;
}

async function expectOk(res: { status: number; text: string }, what: string) {
  if (res.status >= 300) throw new Error(`${what} failed: ${res.status} ${res.text.slice(0, 300)}`);
}

/**
 * Follows the link in the newest confirm-your-e-mail mail to the address, as its holder
 * would: the address is confirmed and the client signed in. Returns where it was sent.
 */
export async function confirmEmail(client: Client, email: string): Promise<string> {
  const link = await confirmLink(email);
  const r = await client.get(new URL(link).pathname + new URL(link).search);
  if (r.status !== 302) throw new Error(`confirming ${email} failed: ${r.status} ${r.text.slice(0, 200)}`);
  return r.headers.location ?? '';
}

/** The link in the newest confirm-your-e-mail mail to the address. */
export async function confirmLink(email: string, after = 0): Promise<string> {
  const until = Date.now() + 30_000;
  for (;;) {
    const mails = (await mailTo(email)).filter((m) => /Confirm your e-mail/.test(m.subject));
    if (mails.length > after) {
      const link = mails[mails.length - 1].text.match(/https?:\/\/\S+\/verify-email\?\S+/);
      if (!link) throw new Error(`no link in the confirmation mail to ${email}`);
      return link[0];
    }
    if (Date.now() > until) throw new Error(`no confirmation mail to ${email}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/**
 * Joins a person (a fresh account) to a company in a role: the owner invites, the person
 * signs up, confirms the address from the mail (which signs them in) and accepts.
 */
export async function joinAs(owner: Client, _companyId: string | null, role: Role, email = uniqueEmail(role)): Promise<{ client: Client; email: string; userId: string; companyId: string }> {
  const inv = await owner.post('/api/members/invitations', { email, role });
  await expectOk(inv, `invite ${role}`);
  const client = new Client();
  const su = await client.post('/api/auth/sign-up/email', { name: `Test ${role}`, email, password: PASSWORD, callbackURL: `/accept-invite/${inv.body.id}` });
  await expectOk(su, `sign up ${role}`);
  await confirmEmail(client, email);
  const acc = await client.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id });
  await expectOk(acc, `accept ${role}`);
  const companyId = acc.body.member.organizationId as string;
  await expectOk(await client.post('/api/companies/switch', { organizationId: companyId }), 'switch');
  return { client, email, userId: su.body.user.id, companyId };
}

/** A new company with one signed-in client per role, made through the real API. */
export async function makeCompany(name = `Test Fence ${randomBytes(3).toString('hex')}`): Promise<TestCompany> {
  const owner = new Client();
  const ownerEmail = uniqueEmail('owner');
  const su = await owner.post('/api/signup', { name: 'Test Owner', email: ownerEmail, password: PASSWORD, companyName: name });
  await expectOk(su, 'sign up owner');
  await confirmEmail(owner, ownerEmail);
  const members = await owner.get('/api/members');
  await expectOk(members, 'list members');
  const ownerId = (members.body.members as { userId: string; email: string }[]).find((m) => m.email === ownerEmail)!.userId;
  const [b, e, c] = await Promise.all((['bookkeeper', 'estimator', 'crew_lead'] as const).map((role) => joinAs(owner, null, role)));
  const id = b.companyId;
  const company: TestCompany = {
    id,
    name,
    owner,
    bookkeeper: b.client,
    estimator: e.client,
    crew_lead: c.client,
    emails: { owner: ownerEmail, bookkeeper: b.email, estimator: e.email, crew_lead: c.email },
    userIds: { owner: ownerId, bookkeeper: b.userId, estimator: e.userId, crew_lead: c.userId },
    as: (role: Role) => company[role],
  };
  return company;
}

/** A customer made through the API. */
export async function makeCustomer(client: Client, name = `Customer ${randomBytes(3).toString('hex')}`) {
  const r = await client.post('/api/customers', { name, email: `${randomBytes(4).toString('hex')}@cust.example`, billingCity: 'Testville' });
  await expectOk(r, 'create customer');
  return r.body as { id: number; name: string };
}

export async function makeJob(client: Client, customerId: number, extra: Record<string, unknown> = {}) {
  const r = await client.post('/api/jobs', { title: 'Test fence', customerId, ...extra });
  await expectOk(r, 'create job');
  return r.body as { id: number; code: string };
}
