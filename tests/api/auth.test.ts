import { afterAll, describe, expect, it } from 'vitest';
import { Client } from '../setup/client';
import { PASSWORD, confirmEmail, makeCompany, uniqueEmail } from '../setup/factory';
import { mailTo, waitForMail } from '../setup/mail';
import { closeTestDb, testDb } from '../setup/db';
import { stack } from '../setup/stack';

afterAll(closeTestDb);

describe('sign-up and sign-in', () => {
  it('signs up the first person as owner of a new company, signed in once the address is confirmed', async () => {
    const c = new Client();
    const email = uniqueEmail('first');
    const r = await c.post('/api/signup', { name: 'First Person', email, password: PASSWORD, companyName: 'Prairie Post & Rail' });
    expect(r.status).toBe(202);
    expect(r.body).toEqual({ status: 'check-email', email });
    expect(r.headers['set-cookie'] ?? []).toEqual([]);
    const m = await testDb()('member as m').join('user as u', 'u.id', 'm.userId').join('organization as o', 'o.id', 'm.organizationId').where('u.email', email).first('m.role', 'm.organizationId', 'o.name', 'u.emailVerified');
    expect(m).toMatchObject({ role: 'owner', name: 'Prairie Post & Rail' });
    expect(Boolean(m.emailVerified)).toBe(false);
    // The company comes with its settings and starting styles and rates (one transaction).
    expect(await testDb()('company_settings').where('organization_id', m.organizationId).first()).toBeTruthy();
    expect((await testDb()('fence_styles').where('organization_id', m.organizationId).count({ n: '*' }))[0].n).toBeGreaterThan(0);
    // Not signed in, and the password alone does not sign in before the address is confirmed.
    expect((await c.get('/api/jobs')).status).toBe(401);
    const early = await new Client().signIn(email, PASSWORD);
    expect(early.status).toBe(403);
    expect(early.body.code).toBe('EMAIL_NOT_VERIFIED');
    expect(await confirmEmail(c, email)).toBe('/');
    expect((await c.get('/api/jobs')).status).toBe(200);
    expect((await c.get('/api/settings')).status).toBe(200);
    expect((await new Client().signIn(email, PASSWORD)).status).toBe(200);
  });

  it('answers 400 with field errors for bad sign-up input', async () => {
    const r = await new Client().post('/api/signup', { name: '', email: 'nope', password: 'short', companyName: '' });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['companyName', 'email', 'name', 'password']);
  });

  it('answers a sign-up with a known address exactly as a new one, and mails the holder instead', async () => {
    const email = uniqueEmail('twice');
    const first = await new Client().post('/api/signup', { name: 'A', email, password: PASSWORD, companyName: 'One Co' });
    await confirmEmail(new Client(), email);
    const again = await new Client().post('/api/signup', { name: 'B', email, password: 'another-password-1', companyName: 'Two Co' });
    const fresh = uniqueEmail('fresh');
    const other = await new Client().post('/api/signup', { name: 'C', email: fresh, password: PASSWORD, companyName: 'Three Co' });
    for (const r of [first, again, other]) {
      expect(r.status).toBe(202);
      expect(r.headers['set-cookie'] ?? []).toEqual([]);
    }
    expect(again.body).toEqual({ ...other.body, email });
    expect(Object.keys(again.headers).sort()).toEqual(Object.keys(other.headers).sort());
    // better-auth's own sign-up (the invitation page uses it) answers alike too.
    const su = (e: string) => new Client().post('/api/auth/sign-up/email', { name: 'D', email: e, password: PASSWORD });
    const [known, unknown] = [await su(email), await su(uniqueEmail('new'))];
    expect([known.status, unknown.status]).toEqual([200, 200]);
    expect(Object.keys(known.body.user).sort()).toEqual(Object.keys(unknown.body.user).sort());
    expect(known.body.token).toBeNull();
    // Nothing changed for the holder: one account, one company, the old password.
    expect((await testDb()('user').where('email', email).count({ n: '*' }))[0].n).toBe(1);
    const companies = await testDb()('member as m').join('user as u', 'u.id', 'm.userId').where('u.email', email).select('m.organizationId');
    expect(companies).toHaveLength(1);
    expect((await new Client().signIn(email, PASSWORD)).status).toBe(200);
    // The holder hears about it.
    await expect.poll(async () => (await mailTo(email)).filter((m) => /Someone tried to sign up/.test(m.subject)).length, { timeout: 20_000 }).toBe(2);
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
  it('invites by e-mail; the invitee confirms the address, comes back to the link and gets the role', async () => {
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
    const here = `/accept-invite/${inv.body.id}`;
    expect((await c.post('/api/auth/sign-up/email', { name: 'New Estimator', email, password: PASSWORD, callbackURL: here })).status).toBe(200);
    // Not signed in yet: joining needs a confirmed address.
    expect((await c.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(401);
    expect(await confirmEmail(c, email)).toBe(here);
    expect((await c.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(200);
    const members = await co.owner.get('/api/members');
    expect(members.body.members.find((m: { email: string }) => m.email === email).role).toBe('estimator');
  });

  it('an invitation link is not a bearer token: an account whose address is not confirmed cannot join', async () => {
    const co = await makeCompany();
    const email = uniqueEmail('victim');
    const inv = await co.owner.post('/api/members/invitations', { email, role: 'bookkeeper' });
    // Someone who learned the link (not the mailbox) signs up with the invited address.
    const intruder = new Client();
    expect((await intruder.post('/api/auth/sign-up/email', { name: 'Intruder', email, password: 'intruder-password-1' })).status).toBe(200);
    expect((await intruder.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(401);
    const signIn = await intruder.signIn(email, 'intruder-password-1');
    expect(signIn.status).toBe(403);
    expect(signIn.body.code).toBe('EMAIL_NOT_VERIFIED');
    expect((await intruder.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(401);
    // Even a session that exists without a confirmed address (made here by hand) is refused.
    const holder = await makeCompany();
    const unconfirmed = new Client();
    expect((await unconfirmed.signIn(holder.emails.estimator, PASSWORD)).status).toBe(200);
    const inv2 = await co.owner.post('/api/members/invitations', { email: holder.emails.estimator, role: 'bookkeeper' });
    await testDb()('user').where('email', holder.emails.estimator).update({ emailVerified: false });
    try {
      const r = await unconfirmed.post('/api/auth/organization/accept-invitation', { invitationId: inv2.body.id });
      expect(r.status).toBe(403);
    } finally {
      await testDb()('user').where('email', holder.emails.estimator).update({ emailVerified: true });
    }
    const members = (await co.owner.get('/api/members')).body.members as { email: string }[];
    expect(members.map((m) => m.email)).not.toContain(email);
    expect(members.map((m) => m.email)).not.toContain(holder.emails.estimator);
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
    await confirmEmail(c, email);
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

describe("better-auth's own endpoints are closed past what the screens use", () => {
  const orgPaths = [
    ['POST', '/api/auth/organization/create', { name: 'Stray Co', slug: 'stray-co-x1' }],
    ['POST', '/api/auth/organization/delete', {}],
    ['POST', '/api/auth/organization/update-member-role', { memberId: 'x', role: ['owner', 'crew_lead'] }],
    ['POST', '/api/auth/organization/remove-member', { memberIdOrEmail: 'x' }],
    ['POST', '/api/auth/organization/leave', {}],
    ['POST', '/api/auth/organization/invite-member', { email: 'x@tests.example', role: 'owner' }],
    ['GET', '/api/auth/organization/list-members', null],
    ['GET', '/api/auth/organization/get-full-organization', null],
    ['POST', '/api/auth/organization/check-slug', { slug: 'thornbury-fence-demo' }],
    ['GET', '/api/auth/get-session', null],
    ['POST', '/api/auth/change-password', { currentPassword: PASSWORD, newPassword: 'x-new-password-1', revokeOtherSessions: false }],
    ['POST', '/api/auth/update-user', { name: 'Renamed' }],
    ['POST', '/api/auth/delete-user', {}],
    ['GET', '/api/auth/no-such-thing', null],
  ] as const;

  it('answers every other path with a JSON 404, for every role', async () => {
    const co = await makeCompany();
    const before = await testDb()('organization').count({ n: '*' });
    for (const role of ['owner', 'bookkeeper', 'estimator', 'crew_lead'] as const) {
      for (const [method, path, body] of orgPaths) {
        const r = method === 'GET' ? await co.as(role).get(path) : await co.as(role).post(path, { organizationId: co.id, ...body });
        expect(r.status, `${method} ${path} as ${role}`).toBe(404);
        expect(r.body.error.code, `${method} ${path} as ${role}`).toBe('NOT_FOUND');
      }
    }
    expect(await testDb()('organization').count({ n: '*' })).toEqual(before);
    expect(await testDb()('organization').where('id', co.id).first('id')).toBeTruthy();
    // The crew lead learned no e-mail, and the roles are as they were.
    const roles = await testDb()('member').where('organizationId', co.id).pluck('role');
    expect(roles.sort()).toEqual(['bookkeeper', 'crew_lead', 'estimator', 'owner']);
  });

  it('creates a company only through the app, always with its settings, and lands in it', async () => {
    const co = await makeCompany();
    const r = await co.owner.post('/api/companies', { name: 'Second Yard Fence' });
    expect(r.status).toBe(201);
    expect(await testDb()('company_settings').where('organization_id', r.body.id).first()).toBeTruthy();
    for (const path of ['/api/settings', '/api/invoices', '/api/receivables', '/api/reports/margin-by-style', '/api/calibration']) {
      expect((await co.owner.get(path)).status, path).toBe(200);
    }
    for (const page of ['/', '/settings', '/invoices', '/receivables', '/margins']) {
      expect((await co.owner.get(page)).status, page).toBe(200);
    }
  });

  it('keeps a role exactly one of the four, whatever the caller sends or writes', async () => {
    const co = await makeCompany();
    const members = (await co.owner.get('/api/members')).body.members as { memberId: string; email: string }[];
    const crew = members.find((m) => m.email === co.emails.crew_lead)!;
    for (const role of [['owner', 'crew_lead'], 'owner,crew_lead', 'admin', 'member', '', 'Owner', null]) {
      const r = await co.owner.patch(`/api/members/${crew.memberId}`, { role });
      expect(r.status, JSON.stringify(role)).toBe(400);
      expect((await co.owner.post('/api/members/invitations', { email: uniqueEmail('r'), role })).status, JSON.stringify(role)).toBe(400);
    }
    expect((await testDb()('member').where('id', crew.memberId).first('role')).role).toBe('crew_lead');
    // The database refuses a list however it is written.
    await expect(testDb()('member').where('id', crew.memberId).update({ role: 'owner,crew_lead' })).rejects.toThrow(/CONSTRAINT|check/i);
  });

  it('never removes or demotes the last owner, even when two owners try at once', async () => {
    const co = await makeCompany();
    const list = async () => (await co.owner.get('/api/members')).body.members as { memberId: string; email: string; role: string }[];
    const owner = (await list()).find((m) => m.role === 'owner')!;
    expect((await co.owner.delete(`/api/members/${owner.memberId}`)).body.error.code).toBe('LAST_OWNER');
    // A second owner; each demotes the other at the same moment: one of them stays owner.
    const second = (await list()).find((m) => m.email === co.emails.bookkeeper)!;
    expect((await co.owner.patch(`/api/members/${second.memberId}`, { role: 'owner' })).status).toBe(200);
    const [a, b] = await Promise.all([
      co.owner.patch(`/api/members/${second.memberId}`, { role: 'estimator' }),
      co.bookkeeper.patch(`/api/members/${owner.memberId}`, { role: 'estimator' }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 422]);
    const owners = await testDb()('member').where({ organizationId: co.id, role: 'owner' }).count({ n: '*' });
    expect(owners[0].n).toBe(1);
  });

  it('signs a member of several companies in to the one they last worked in', async () => {
    const a = await makeCompany('Aardvark Fence');
    const z = await makeCompany('Zephyr Fence');
    // The owner of Zephyr also starts a company whose name sorts first.
    expect((await z.owner.post('/api/companies', { name: 'AAA Stray Fence' })).status).toBe(201);
    expect((await z.owner.post('/api/companies/switch', { organizationId: z.id })).status).toBe(200);
    const c = new Client();
    expect((await c.signIn(z.emails.owner, PASSWORD)).status).toBe(200);
    const cust = await z.owner.post('/api/customers', { name: 'Only in Zephyr' });
    expect((await c.get(`/api/customers/${cust.body.id}`)).status).toBe(200);
    // An invited person lands in the company they joined last.
    const email = uniqueEmail('two');
    const p = new Client();
    await p.post('/api/auth/sign-up/email', { name: 'Two', email, password: PASSWORD });
    await confirmEmail(p, email);
    for (const co of [z, a]) {
      const inv = await co.owner.post('/api/members/invitations', { email, role: 'estimator' });
      expect((await p.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id })).status).toBe(200);
    }
    const later = new Client();
    expect((await later.signIn(email, PASSWORD)).status).toBe(200);
    const custA = await a.owner.post('/api/customers', { name: 'Only in Aardvark' });
    expect((await later.get(`/api/customers/${custA.body.id}`)).status).toBe(200);
  });
});

describe('passwords and where sign-in sends you', () => {
  it('changing the password signs out every other session', async () => {
    const co = await makeCompany();
    const email = co.emails.estimator;
    const here = new Client();
    const other = new Client();
    expect((await here.signIn(email, PASSWORD)).status).toBe(200);
    expect((await other.signIn(email, PASSWORD)).status).toBe(200);
    expect((await here.post('/api/account/password', { currentPassword: 'wrong-password-1', newPassword: 'a-newer-password-1' })).status).toBe(400);
    expect((await other.get('/api/jobs')).status).toBe(200);
    const r = await here.post('/api/account/password', { currentPassword: PASSWORD, newPassword: 'a-newer-password-1' });
    expect(r.status).toBe(200);
    expect((await here.get('/api/jobs')).status).toBe(200);
    expect((await other.get('/api/jobs')).status).toBe(401);
    expect((await co.estimator.get('/api/jobs')).status).toBe(401);
    expect((await new Client().signIn(email, PASSWORD)).status).toBe(401);
    expect((await new Client().signIn(email, 'a-newer-password-1')).status).toBe(200);
  });

  it('resetting the password by mail signs out every session', async () => {
    const co = await makeCompany();
    const email = co.emails.crew_lead;
    expect((await co.crew_lead.get('/api/jobs')).status).toBe(200);
    const c = new Client();
    await c.post('/api/auth/request-password-reset', { email, redirectTo: '/reset-password' });
    const resetMail = async () => (await mailTo(email)).find((m) => /Reset your Tallypost password/.test(m.subject));
    await expect.poll(resetMail, { timeout: 20_000 }).toBeTruthy();
    const mail = (await resetMail())!;
    const link = new URL(mail.text.match(/https?:\/\/\S+/)![0]);
    const token = new URL((await c.get(link.pathname + link.search)).headers.location!, stack().appUrl).searchParams.get('token');
    expect((await c.post('/api/auth/reset-password', { newPassword: 'reset-password-22', token })).status).toBe(200);
    expect((await co.crew_lead.get('/api/jobs')).status).toBe(401);
  });

  // Each is something a browser would read as another site, or as script.
  const HOSTILE = ['//evil.example/x', '/\\evil.example/x', '/%5Cevil.example/x', '\\\\evil.example', 'https://evil.example/', 'javascript:alert(1)',
    '/%09/evil.example', '/%0A/evil.example', '/\t/evil.example', '/%2F%2Fevil.example', ' //evil.example', 'evil.example'];

  it('never sends a signed-in person to another site from ?next=', async () => {
    const co = await makeCompany();
    for (const next of HOSTILE) {
      const r = await co.owner.get(`/sign-in?next=${encodeURIComponent(next)}`);
      expect(r.status, next).toBe(302);
      expect(r.headers.location, next).toBe('/');
    }
    // The raw %5C form, as the address bar would carry it.
    const raw = await co.owner.get('/sign-in?next=/%5Cevil.example/x');
    expect(raw.headers.location).toBe('/');
    expect((await co.owner.get(`/sign-in?next=${encodeURIComponent('/jobs?status=won')}`)).headers.location).toBe('/jobs?status=won');
  });

  it("refuses better-auth's redirect targets that leave the site", async () => {
    for (const target of HOSTILE) {
      const r = await new Client().post('/api/auth/request-password-reset', { email: 'nobody@tests.example', redirectTo: target });
      expect(r.status, target).toBe(400);
      const s = await new Client().post('/api/auth/sign-up/email', { name: 'X', email: uniqueEmail('cb'), password: PASSWORD, callbackURL: target });
      expect(s.status, target).toBe(400);
      const v = await new Client().get(`/api/auth/verify-email?token=x&callbackURL=${encodeURIComponent(target)}`);
      expect(v.status, target).toBe(400);
    }
  });
});
