import { randomBytes } from 'node:crypto';
import { Client } from './client.ts';
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

/** Joins a person (a fresh account) to a company in a role, through invite and accept. */
export async function joinAs(owner: Client, companyId: string, role: Role, email = uniqueEmail(role)): Promise<{ client: Client; email: string; userId: string }> {
  const inv = await owner.post('/api/members/invitations', { email, role });
  await expectOk(inv, `invite ${role}`);
  const client = new Client();
  const su = await client.post('/api/auth/sign-up/email', { name: `Test ${role}`, email, password: PASSWORD });
  await expectOk(su, `sign up ${role}`);
  const acc = await client.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id });
  await expectOk(acc, `accept ${role}`);
  await expectOk(await client.post('/api/companies/switch', { organizationId: companyId }), 'switch');
  return { client, email, userId: su.body.user.id };
}

/** A new company with one signed-in client per role, made through the real API. */
export async function makeCompany(name = `Test Fence ${randomBytes(3).toString('hex')}`): Promise<TestCompany> {
  const owner = new Client();
  const ownerEmail = uniqueEmail('owner');
  const su = await owner.post('/api/signup', { name: 'Test Owner', email: ownerEmail, password: PASSWORD, companyName: name });
  await expectOk(su, 'sign up owner');
  const me = await owner.get('/api/auth/get-session');
  const id = su.body.company.id as string;
  const b = await joinAs(owner, id, 'bookkeeper');
  const e = await joinAs(owner, id, 'estimator');
  const c = await joinAs(owner, id, 'crew_lead');
  const company: TestCompany = {
    id,
    name,
    owner,
    bookkeeper: b.client,
    estimator: e.client,
    crew_lead: c.client,
    emails: { owner: ownerEmail, bookkeeper: b.email, estimator: e.email, crew_lead: c.email },
    userIds: { owner: me.body.user.id, bookkeeper: b.userId, estimator: e.userId, crew_lead: c.userId },
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
