import { afterAll, describe, expect, it } from 'vitest';
import { Client } from '../../setup/client';
import { PASSWORD, confirmLink, makeCompany, uniqueEmail } from '../../setup/factory';
import { closeTestDb, testDb } from '../../setup/db';
import { startApp } from '../../setup/processes';
import { stack } from '../../setup/stack';
import { createHmac } from 'node:crypto';

afterAll(closeTestDb);

describe('sessions and the web edge', () => {
  it('gives 20 parallel sign-ups 20 accounts and 20 companies', async () => {
    const emails = Array.from({ length: 20 }, (_, i) => uniqueEmail(`par${i}`));
    const results = await Promise.all(emails.map((email, i) => new Client().post('/api/signup', { name: `Parallel ${i}`, email, password: PASSWORD, companyName: `Parallel Fence ${i}` })));
    expect(results.map((r) => r.status)).toEqual(Array(20).fill(202));
    const users = await testDb()('user').whereIn('email', emails).select('id');
    expect(new Set(users.map((u) => u.id)).size).toBe(20);
    const owners = await testDb()('member').whereIn('userId', users.map((u) => u.id)).andWhere('role', 'owner').select('organizationId');
    expect(new Set(owners.map((m) => m.organizationId)).size).toBe(20);
  });

  it('marks the session cookie Secure and sends HSTS when the app is served over HTTPS', async () => {
    const origin = 'https://fence.example';
    const app = await startApp({ APP_URL: origin });
    try {
      const c = new Client(app.url);
      const email = uniqueEmail('secure');
      const r = await c.request('POST', '/api/auth/sign-up/email', { json: { name: 'Secure', email, password: PASSWORD }, origin });
      expect(r.status).toBe(200);
      // The confirmation link (built on APP_URL) signs the person in on this server.
      const link = new URL(await confirmLink(email));
      expect(link.origin).toBe(origin);
      const confirmed = await c.get(link.pathname + link.search);
      expect(confirmed.status).toBe(302);
      const cookie = (confirmed.headers['set-cookie'] ?? []).find((s) => s.includes('session_token'))!;
      expect(cookie).toMatch(/; Secure/i);
      expect(cookie).toMatch(/HttpOnly/i);
      expect(cookie).toMatch(/^__Secure-/);
      for (const path of ['/sign-in', '/api/health', '/api/jobs']) {
        expect((await new Client(app.url).get(path)).headers['strict-transport-security'], path).toBe('max-age=31536000; includeSubDomains');
      }
    } finally {
      await app.kill();
    }
    // Plain http on loopback (the local stack): no HSTS, which would lock browsers out of it.
    expect((await new Client().get('/sign-in')).headers['strict-transport-security']).toBeUndefined();
  });

  it('ends a session at its absolute lifetime, however active it was', async () => {
    const app = await startApp({ SESSION_MAX_AGE: '3' });
    try {
      const co = await makeCompany();
      const c = new Client(app.url);
      expect((await c.signIn(co.emails.owner, PASSWORD)).status).toBe(200);
      expect((await c.get('/api/jobs')).status).toBe(200);
      await new Promise((r) => setTimeout(r, 1500));
      expect((await c.get('/api/jobs')).status).toBe(200);
      await new Promise((r) => setTimeout(r, 2500));
      expect((await c.get('/api/jobs')).status).toBe(401);
    } finally {
      await app.kill();
    }
  });

  it('keeps SQL- and script-shaped text as text and renders it escaped', async () => {
    const co = await makeCompany();
    const nasty = `<script>alert('x')</script>'; DROP TABLE jobs; -- "quoted" & more`;
    const made = await co.owner.post('/api/customers', { name: nasty, notes: "Robert'); DELETE FROM customers;--" });
    expect(made.status).toBe(201);
    const back = await co.owner.get(`/api/customers/${made.body.id}`);
    expect(back.body.name).toBe(nasty);
    expect(back.body.notes).toBe("Robert'); DELETE FROM customers;--");
    const page = await co.owner.get(`/customers/${made.body.id}`);
    expect(page.status).toBe(200);
    expect(page.text).not.toContain("<script>alert('x')</script>");
    expect(page.text).toContain('&lt;script&gt;');
    expect(await testDb()('jobs').count({ n: '*' })).toBeTruthy();
    const search = await co.owner.get(`/api/customers?q=${encodeURIComponent("' OR 1=1 --")}`);
    expect(search.status).toBe(200);
    expect(search.body.total).toBe(0);
  });

  it('refuses unknown query parameters and out-of-range values', async () => {
    const co = await makeCompany();
    expect((await co.owner.get('/api/jobs?pageSize=0')).status).toBe(400);
    expect((await co.owner.get('/api/jobs?page=-1')).status).toBe(400);
    expect((await co.owner.get('/api/jobs?admin=1')).status).toBe(400);
    expect((await co.owner.post('/api/customers', { name: 'x'.repeat(201) })).status).toBe(400);
  });

  it('sends the security headers on pages and API answers alike', async () => {
    for (const path of ['/sign-in', '/api/health', '/api/jobs']) {
      const r = await new Client().get(path);
      expect(r.headers['content-security-policy'], path).toContain("frame-ancestors 'none'");
      expect(r.headers['x-content-type-options'], path).toBe('nosniff');
      expect(r.headers['referrer-policy'], path).toBe('strict-origin-when-cross-origin');
    }
  });
});

describe('the customer\'s invoice link', () => {
  it('is signed and unguessable, and the owner can revoke it', async () => {
    const { billableJob, draft, issue } = await import('../../setup/invoices');
    const co = await makeCompany();
    const { job } = await billableJob(co, 1_000_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 10_000, overDepositCapOk: true, overrideReason: 'Link test' })).id);
    const token = (inv.publicUrl as string).split('/pay/')[1];
    const [id, nonce, sig] = token.split('.');
    expect(nonce).toHaveLength(43); // 32 random bytes
    // Signed with its own key, not the session secret: knowing one gives nothing of the other.
    const hmac = (key: string) => createHmac('sha256', key).update(`invoice-link:${id}:${nonce}`).digest('base64url');
    expect(sig).toBe(hmac(stack().appEnv.LINK_SIGNING_SECRET));
    expect(stack().appEnv.LINK_SIGNING_SECRET).not.toBe(stack().appEnv.AUTH_SECRET);
    expect((await new Client().get(`/pay/${id}.${nonce}.${hmac(stack().appEnv.AUTH_SECRET)}`, { accept: 'text/html' })).status).toBe(404);
    const anyone = new Client();
    expect((await anyone.get(`/pay/${token}`, { accept: 'text/html' })).status).toBe(200);
    // A forged signature, another id with the same nonce, or a guessed nonce: all 404.
    for (const forged of [`${id}.${nonce}.${sig.slice(0, -2)}xx`, `${Number(id) + 1}.${nonce}.${sig}`, `${id}.${'A'.repeat(43)}.${sig}`]) {
      expect((await anyone.get(`/pay/${forged}`, { accept: 'text/html' })).status, forged).toBe(404);
    }
    expect((await co.bookkeeper.delete(`/api/invoices/${inv.id}/link`)).status).toBe(403);
    const revoked = await co.owner.delete(`/api/invoices/${inv.id}/link`);
    expect(revoked.status).toBe(200);
    expect(revoked.body.publicUrl).not.toContain(token);
    expect((await anyone.get(`/pay/${token}`, { accept: 'text/html' })).status).toBe(404);
    expect((await anyone.post(`/api/public/invoices/${token}/checkout`)).status).toBe(404);
    const fresh = (revoked.body.publicUrl as string).split('/pay/')[1];
    expect((await anyone.get(`/pay/${fresh}`, { accept: 'text/html' })).status).toBe(200);
  });
});
