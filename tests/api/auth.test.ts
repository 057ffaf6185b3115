import { afterAll, describe, expect, it } from 'vitest';
import { Client } from '../setup/client';
import { PASSWORD, makeCompany, uniqueEmail } from '../setup/factory';
import { waitForMail } from '../setup/mail';
import { closeTestDb, testDb } from '../setup/db';
import { stack } from '../setup/stack';

afterAll(closeTestDb);

describe('sign-up and sign-in', () => {
  it('signs up the first person as owner of a new company', async () => {
    const c = new Client();
    const email = uniqueEmail('first');
    const r = await c.post('/api/signup', { name: 'First Person', email, password: PASSWORD, companyName: 'Prairie Post & Rail' });
    expect(r.status).toBe(201);
    expect(r.body.company.name).toBe('Prairie Post & Rail');
    const m = await testDb()('member as m').join('user as u', 'u.id', 'm.userId').where('u.email', email).first('m.role', 'm.organizationId');
    expect(m).toMatchObject({ role: 'owner', organizationId: r.body.company.id });
    const settings = await testDb()('company_settings').where('organization_id', r.body.company.id).first();
    expect(settings).toBeTruthy();
    expect((await c.get('/api/jobs')).status).toBe(200);
  });

  it('answers 400 with field errors for bad sign-up input', async () => {
    const r = await new Client().post('/api/signup', { name: '', email: 'nope', password: 'short', companyName: '' });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['companyName', 'email', 'name', 'password']);
  });

  it('answers 409 for an e-mail that already has an account', async () => {
    const email = uniqueEmail('twice');
    expect((await new Client().post('/api/signup', { name: 'A', email, password: PASSWORD, companyName: 'One Co' })).status).toBe(201);
    const again = await new Client().post('/api/signup', { name: 'B', email, password: PASSWORD, companyName: 'Two Co' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('DUPLICATE_EMAIL');
  });

  it('signs in the demo owner and keeps the session cookie HttpOnly and SameSite', async () => {
    const c = new Client();
    const r = await c.signIn('owner@example.com', stack().demoPassword);
    expect(r.status).toBe(200);
    const cookie = (r.headers['set-cookie'] ?? []).find((s) => s.includes('session_token'));
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    const jobs = await c.get('/api/jobs?pageSize=5');
    expect(jobs.status).toBe(200);
    expect(jobs.body.total).toBeGreaterThanOrEqual(55);
  });

  it('answers an unknown e-mail and a wrong password alike', async () => {
    const a = await new Client().signIn('nobody-here@tests.example', 'whatever-password');
    const b = await new Client().signIn('owner@example.com', 'wrong-password-123');
    expect(a.status).toBe(401);
    expect(b.status).toBe(401);
    expect(a.body).toEqual(b.body);
  });

  it('refuses a signed-out API call with 401 and redirects a page to sign-in', async () => {
    const c = new Client();
    expect((await c.get('/api/jobs')).status).toBe(401);
    const page = await c.get('/jobs');
    expect(page.status).toBe(302);
    expect(page.headers.location).toBe('/sign-in?next=%2Fjobs');
  });

  it('refuses a write with no Origin or a foreign Origin, whatever its type', async () => {
    const co = await makeCompany();
    const owner = co.owner;
    const body = JSON.stringify({ name: 'X' });
    for (const origin of [null, 'https://evil.example']) {
      for (const type of ['application/json', 'text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x']) {
        const r = await owner.request('POST', '/api/customers', { body, headers: { 'content-type': type }, origin });
        expect(r.status, `${origin} ${type}`).toBe(403);
      }
    }
  });

  it('sends a password-reset link by e-mail and the new password works', async () => {
    const co = await makeCompany();
    const email = co.emails.estimator;
    const c = new Client();
    expect((await c.post('/api/auth/request-password-reset', { email, redirectTo: '/reset-password' })).status).toBe(200);
    await expect.poll(async () => (await waitForMail(email)).some((m) => /Reset your Tallypost password/.test(m.subject)), { timeout: 20_000 }).toBe(true);
    const mail = (await waitForMail(email)).find((m) => /Reset your Tallypost password/.test(m.subject))!;
    const link = mail.text.match(/https?:\/\/\S+/)![0];
    const verify = await c.get(new URL(link).pathname + new URL(link).search);
    expect(verify.status).toBe(302);
    const token = new URL(verify.headers.location!, stack().appUrl).searchParams.get('token');
    expect(token).toBeTruthy();
    expect((await c.post('/api/auth/reset-password', { newPassword: 'a-brand-new-password', token })).status).toBe(200);
    expect((await new Client().signIn(email, 'a-brand-new-password')).status).toBe(200);
    expect((await new Client().signIn(email, PASSWORD)).status).toBe(401);
  });

  it('rate-limits sign-in per client address, and a forged X-Forwarded-For does not reset it', async () => {
    const c = new Client();
    const max = Number(stack().appEnv.SIGN_IN_RATE_MAX ?? 5);
    const statuses: number[] = [];
    for (let i = 0; i < max + 1; i++) statuses.push((await c.signIn('owner@example.com', 'wrong-password-xx')).status);
    expect(statuses.slice(0, max).every((s) => s === 401)).toBe(true);
    expect(statuses[max]).toBe(429);
    const forged = await c.request('POST', '/api/auth/sign-in/email', { json: { email: 'owner@example.com', password: stack().demoPassword }, headers: { 'x-forwarded-for': '203.0.113.9', 'x-tallypost-client-ip': '203.0.113.10' } });
    expect(forged.status).toBe(429);
    // Another address is not affected.
    expect((await new Client().signIn('owner@example.com', stack().demoPassword)).status).toBe(200);
    const rows = await testDb()('rateLimit').where('key', 'like', `%${c.localAddress}%`);
    expect(rows.length).toBeGreaterThan(0);
    console.log(`sign-in limit: ${max} attempts per ${stack().appEnv.SIGN_IN_RATE_WINDOW ?? 60} s per address, kept in MariaDB`);
  });
});

describe('invitations and members', () => {
  it('invites by e-mail; the invitee accepts through the link and gets the role', async () => {
    const co = await makeCompany();
    const email = uniqueEmail('invitee');
    const inv = await co.owner.post('/api/members/invitations', { email, role: 'estimator' });
    expect(inv.status).toBe(201);
    const [mail] = await waitForMail(email);
    expect(mail.subject).toContain(co.name);
    expect(mail.text).toContain(`/accept-invite/${inv.body.id}`);
    const page = await new Client().get(`/accept-invite/${inv.body.id}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain(co.name);
    const c = new Client();
    await c.post('/api/auth/sign-up/email', { name: 'New Estimator', email, password: PASSWORD });
    expect((await c.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(200);
    const members = await co.owner.get('/api/members');
    expect(members.body.members.find((m: { email: string }) => m.email === email).role).toBe('estimator');
  });

  it('only the owner manages members', async () => {
    const co = await makeCompany();
    for (const role of ['bookkeeper', 'estimator', 'crew_lead'] as const) {
      expect((await co.as(role).post('/api/members/invitations', { email: uniqueEmail('x'), role: 'owner' })).status, role).toBe(403);
      expect((await co.as(role).get('/api/members')).status, role).toBe(403);
    }
  });

  it('a demoted or removed member is refused on the very next request in every session', async () => {
    const co = await makeCompany();
    const second = new Client();
    expect((await second.signIn(co.emails.estimator, PASSWORD)).status).toBe(200);
    expect((await second.post('/api/customers', { name: 'Allowed' })).status).toBe(201);
    const members = (await co.owner.get('/api/members')).body.members as { memberId: string; email: string }[];
    const est = members.find((m) => m.email === co.emails.estimator)!;
    expect((await co.owner.patch(`/api/members/${est.memberId}`, { role: 'crew_lead' })).status).toBe(200);
    expect((await second.post('/api/customers', { name: 'Refused' })).status).toBe(403);
    expect((await co.estimator.post('/api/customers', { name: 'Refused' })).status).toBe(403);
    expect((await co.owner.delete(`/api/members/${est.memberId}`)).status).toBe(204);
    expect((await second.get('/api/jobs')).status).toBe(403);
    expect((await co.estimator.get('/api/jobs')).status).toBe(403);
  });

  it('keeps at least one owner', async () => {
    const co = await makeCompany();
    const members = (await co.owner.get('/api/members')).body.members as { memberId: string; role: string }[];
    const owner = members.find((m) => m.role === 'owner')!;
    const r = await co.owner.patch(`/api/members/${owner.memberId}`, { role: 'bookkeeper' });
    expect(r.status).toBe(422);
    expect(r.body.error.code).toBe('LAST_OWNER');
  });

  it('switches between companies a person belongs to, and only those', async () => {
    const a = await makeCompany('Alpha Fence');
    const b = await makeCompany('Beta Fence');
    const email = uniqueEmail('both');
    const c = new Client();
    await c.post('/api/auth/sign-up/email', { name: 'Both', email, password: PASSWORD });
    for (const co of [a, b]) {
      const inv = await co.owner.post('/api/members/invitations', { email, role: 'bookkeeper' });
      expect((await c.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(200);
    }
    await c.post('/api/companies/switch', { organizationId: a.id });
    const custA = await a.owner.post('/api/customers', { name: 'Only in Alpha' });
    expect((await c.get(`/api/customers/${custA.body.id}`)).status).toBe(200);
    await c.post('/api/companies/switch', { organizationId: b.id });
    expect((await c.get(`/api/customers/${custA.body.id}`)).status).toBe(404);
    const stranger = await makeCompany();
    expect((await c.post('/api/companies/switch', { organizationId: stranger.id })).status).toBe(404);
  });
});

describe('reading the session cookie', () => {
  const sessionCookie = (c: Client) => [...c.cookies.keys()].find((k) => k.endsWith('session_token'))!;
  const tokenOf = (c: Client) => decodeURIComponent(c.cookies.get(sessionCookie(c))!).split('.')[0];

  it('refuses a session token whose signature was changed, made up, or left off', async () => {
    const co = await makeCompany();
    const c = new Client();
    expect((await c.signIn(co.emails.estimator, PASSWORD)).status).toBe(200);
    expect((await c.get('/api/jobs')).status).toBe(200);
    const name = sessionCookie(c);
    const [token, sig] = decodeURIComponent(c.cookies.get(name)!).split('.');
    const flipped = `${sig[0] === 'A' ? 'B' : 'A'}${sig.slice(1)}`;
    c.cookies.set(name, encodeURIComponent(`${token}.${flipped}`));
    expect((await c.get('/api/jobs')).status).toBe(401);
    c.cookies.set(name, encodeURIComponent(`${token}.${'x'.repeat(43)}=`));
    expect((await c.get('/api/jobs')).status).toBe(401);
    c.cookies.set(name, encodeURIComponent(token));
    expect((await c.get('/api/jobs')).status).toBe(401);
  });

  it('refuses an expired session and removes it; slides one that is due for a refresh', async () => {
    const co = await makeCompany();
    const expired = new Client();
    expect((await expired.signIn(co.emails.bookkeeper, PASSWORD)).status).toBe(200);
    await testDb()('session').where('token', tokenOf(expired)).update({ expiresAt: new Date(Date.now() - 60_000) });
    expect((await expired.get('/api/jobs')).status).toBe(401);
    expect(await testDb()('session').where('token', tokenOf(expired)).first()).toBeUndefined();

    const sliding = new Client();
    expect((await sliding.signIn(co.emails.bookkeeper, PASSWORD)).status).toBe(200);
    // Two days left of a seven-day session: past the one-day update age, so it is renewed.
    const soon = new Date(Date.now() + 2 * 86_400_000);
    await testDb()('session').where('token', tokenOf(sliding)).update({ expiresAt: soon });
    expect((await sliding.get('/api/jobs')).status).toBe(200);
    const row = await testDb()('session').where('token', tokenOf(sliding)).first();
    expect(new Date(row.expiresAt).getTime()).toBeGreaterThan(Date.now() + 6 * 86_400_000);
    expect((await sliding.get('/api/jobs')).status).toBe(200);
  });
});
