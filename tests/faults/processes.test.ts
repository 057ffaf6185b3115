import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client } from '../setup/client';
import { PASSWORD, makeCompany, makeCustomer, uniqueEmail, type TestCompany } from '../setup/factory';
import { waitForMail, mailTo } from '../setup/mail';
import { roundRobin, startApp, startWorker, type Proc } from '../setup/processes';
import { stack } from '../setup/stack';
import { closeTestDb, testDb } from '../setup/db';
import { billableJob, draft, issue, postWebhook } from '../setup/invoices';

let apps: (Proc & { url: string })[] = [];
let lb: Awaited<ReturnType<typeof roundRobin>>;
let co: TestCompany;

beforeAll(async () => {
  co = await makeCompany();
  lb = await roundRobin();
  // The split's origin is the one browsers see; both processes must trust it.
  apps = await Promise.all([startApp({ TRUSTED_ORIGINS: lb.url }), startApp({ TRUSTED_ORIGINS: lb.url })]);
  lb.targets.push(...apps.map((a) => a.url));
});

afterAll(async () => {
  await lb?.close();
  for (const a of apps) await a.kill();
  await closeTestDb();
});

describe('two app processes behind a round-robin split', () => {
  it('keeps a session on both, and job codes stay distinct under concurrent creates from both', async () => {
    const c = new Client(lb.url);
    expect((await c.signIn(co.emails.owner, PASSWORD)).status).toBe(200);
    const before = [lb.hits[0] ?? 0, lb.hits[1] ?? 0];
    const reads = await Promise.all(Array.from({ length: 10 }, () => c.get('/api/jobs?pageSize=1')));
    expect(reads.every((r) => r.status === 200)).toBe(true);
    expect(lb.hits[0] - before[0]).toBeGreaterThan(0);
    expect(lb.hits[1] - before[1]).toBeGreaterThan(0);
    const customer = await makeCustomer(c);
    const made = await Promise.all(Array.from({ length: 12 }, (_, i) => c.post('/api/jobs', { title: `Split ${i}`, customerId: customer.id })));
    expect(made.map((r) => r.status)).toEqual(Array(12).fill(201));
    expect(new Set(made.map((r) => r.body.code)).size).toBe(12);
  });

  it('issues invoice numbers without gaps when both processes issue at once', async () => {
    const c = new Client(lb.url);
    expect((await c.signIn(co.emails.owner, PASSWORD)).status).toBe(200);
    const { job } = await billableJob(co, 50_000_000);
    const drafts = await Promise.all(Array.from({ length: 12 }, () => draft(c, { jobId: job.id, kind: 'deposit', requestedCents: 1_000, overDepositCapOk: true, overrideReason: 'Split test' })));
    const before = lb.hits.slice();
    const issued = await Promise.all(drafts.map((d) => c.post(`/api/invoices/${d.id}/issue`)));
    expect(issued.map((r) => r.status)).toEqual(Array(12).fill(200));
    expect((lb.hits[0] ?? 0) - (before[0] ?? 0)).toBeGreaterThan(0);
    expect((lb.hits[1] ?? 0) - (before[1] ?? 0)).toBeGreaterThan(0);
    const all = (await testDb()('invoices').where('organization_id', co.id).whereNotNull('number').orderBy('number').pluck('number')) as number[];
    expect(all).toEqual(Array.from({ length: all.length }, (_, i) => i + 1));
  });

  it('records one payment when the same webhook reaches both processes', async () => {
    const c = new Client(lb.url);
    expect((await c.signIn(co.emails.owner, PASSWORD)).status).toBe(200);
    const { job } = await billableJob(co, 50_000_000);
    const inv = await issue(c, (await draft(c, { jobId: job.id, kind: 'deposit', requestedCents: 5_000, overDepositCapOk: true, overrideReason: 'Split test' })).id);
    const meta = { invoice_id: String(inv.id), organization_id: co.id };
    const payload = JSON.stringify({ id: `evt_test_split${inv.id}`, object: 'event', type: 'payment_intent.succeeded', created: Math.floor(Date.now() / 1000), data: { object: { id: `pi_test_split${inv.id}`, object: 'payment_intent', amount: inv.totalCents, amount_received: inv.totalCents, currency: 'usd', status: 'succeeded', metadata: meta } } });
    const results = await Promise.all(Array.from({ length: 10 }, (_, i) => postWebhook(new Client(apps[i % 2].url), payload)));
    expect(results.map((r) => r.status)).toEqual(Array(10).fill(200));
    const payments = await testDb()('payments').where({ organization_id: co.id, invoice_id: inv.id });
    expect(payments).toHaveLength(1);
  });

  it('counts sign-in attempts across both processes (the limit lives in MariaDB)', async () => {
    const c = new Client(lb.url);
    const max = Number(stack().appEnv.SIGN_IN_RATE_MAX ?? 5);
    const statuses: number[] = [];
    for (let i = 0; i <= max; i++) statuses.push((await c.signIn(co.emails.owner, 'wrong-password-zz')).status);
    expect(statuses[max]).toBe(429);
  });
});

describe('the outbox survives crashes', () => {
  it('a worker that dies after claiming a mail leaves it to another, which sends it exactly once', async () => {
    const stackWorker = stack().pids.worker;
    process.kill(stackWorker, 'SIGSTOP');
    try {
      const email = uniqueEmail('crash');
      const inv = await co.owner.post('/api/members/invitations', { email, role: 'estimator' });
      expect(inv.status).toBe(201);
      const row = await testDb()('outbox').where('to_address', email).first();
      expect(row.status).toBe('pending');
      const doomed = startWorker({ TALLYPOST_FAULT: 'outbox-after-claim', OUTBOX_LOCK_SECONDS: '2' });
      await new Promise<void>((r) => doomed.child.once('exit', () => r()));
      expect((await testDb()('outbox').where('id', row.id).first()).status).toBe('sending');
      expect(await mailTo(email)).toHaveLength(0);
      // Two healthy workers race for it once the dead one's lock runs out.
      const w1 = startWorker({ OUTBOX_LOCK_SECONDS: '2' });
      const w2 = startWorker({ OUTBOX_LOCK_SECONDS: '2' });
      await waitForMail(email, 1, 30_000);
      await new Promise((r) => setTimeout(r, 3000));
      expect(await mailTo(email)).toHaveLength(1);
      const sent = await testDb()('outbox').where('id', row.id).first();
      expect(sent.status).toBe('sent');
      expect(sent.message_id).toContain(`outbox-${row.id}@`);
      await w1.kill();
      await w2.kill();
    } finally {
      process.kill(stackWorker, 'SIGCONT');
    }
  });

  it('an app killed right after a change that queues mail loses no mail', async () => {
    const doomed = await startApp();
    const owner = new Client(doomed.url);
    expect((await owner.signIn(co.emails.owner, PASSWORD)).status).toBe(200);
    const email = uniqueEmail('killed');
    const inv = await owner.post('/api/members/invitations', { email, role: 'bookkeeper' });
    expect(inv.status).toBe(201);
    await doomed.kill('SIGKILL');
    await waitForMail(email, 1, 30_000);
    await new Promise((r) => setTimeout(r, 1500));
    expect(await mailTo(email)).toHaveLength(1);
  });
});
