import { afterAll, describe, expect, it } from 'vitest';
import { startMariaDb, stopMariaDb, type MariaDb } from '../../src/cli/stack/mariadb';
import { Client } from '../setup/client';
import { makeCompany, makeCustomer } from '../setup/factory';
import { stack } from '../setup/stack';
import { closeTestDb, testDb } from '../setup/db';
import { billableJob, draft, issue } from '../setup/invoices';
import { upload } from '../api/receipts-helpers';

afterAll(closeTestDb);

function maria(): MariaDb {
  const m = stack().mariadb;
  if (!m) throw new Error('the fault tests need the local MariaDB (no DATABASE_URL)');
  return { ...m };
}

describe('MariaDB stopped and started under traffic', () => {
  it('answers 503 while it is down, recovers by itself, and loses nothing committed', async () => {
    const co = await makeCompany();
    const before = await makeCustomer(co.owner, 'Committed before the restart');
    // A payment and an import committed before the restart must still be there after it.
    const { job } = await billableJob(co, 2_000_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 10_000, overDepositCapOk: true, overrideReason: 'Restart test' })).id);
    const pay = await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: 10_000, method: 'check', receivedOn: inv.today, reference: 'Check 1001' });
    expect(pay.status, pay.text).toBe(201);
    const up = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'before.csv', content: `Date,Description,Amount,PO\n2026-03-02,Posts,$120.00,${job.code}\n` }, { supplier: 'Restart Yard' });
    expect((await co.bookkeeper.post(`/api/receipts/imports/${up.body.id}/commit`, {})).status).toBe(200);
    const m = maria();
    const statuses: number[] = [];
    let running = true;
    const traffic = (async () => {
      const c = co.bookkeeper;
      while (running) {
        const r = await c.get('/api/customers?pageSize=5').catch(() => ({ status: 0 }));
        statuses.push(r.status);
        await new Promise((res) => setTimeout(res, 50));
      }
    })();
    await new Promise((r) => setTimeout(r, 500));
    await stopMariaDb(m);
    await new Promise((r) => setTimeout(r, 1500));
    const health = await new Client().get('/api/health');
    expect(health.status).toBe(503);
    expect(health.body).toEqual({ ok: false, db: 'down' });
    const page = await co.owner.get('/jobs');
    expect(page.status).toBe(503);
    expect(page.text).toContain("can't reach the database");
    await startMariaDb(m, stack().logDir, stack().root);
    // The app reconnects on its own: no restart of the app.
    await expect.poll(async () => (await co.owner.get('/api/customers?pageSize=1')).status, { timeout: 30_000, interval: 250 }).toBe(200);
    running = false;
    await traffic;
    const seen = new Set(statuses);
    console.log(`statuses during the restart: ${[...seen].join(', ')} over ${statuses.length} requests`);
    expect([...seen].every((s) => s === 200 || s === 503)).toBe(true);
    expect(seen.has(503)).toBe(true);
    expect((await co.owner.get(`/api/customers/${before.id}`)).body.name).toBe('Committed before the restart');
    expect((await co.owner.get(`/api/invoices/${inv.id}`)).body.payments).toHaveLength(1);
    expect(await testDb()('cost_lines').where({ organization_id: co.id, job_id: job.id })).toHaveLength(1);
    const after = await makeCustomer(co.owner, 'Made after the restart');
    expect(await testDb()('customers').where('id', after.id).first()).toBeTruthy();
  });
});
