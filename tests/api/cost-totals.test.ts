import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { costTotalsDrift } from '../setup/cost-totals';
import { ok } from './receipts-helpers';

// The margin reports read each job's actual cost from job_cost_totals, which MariaDB triggers
// keep in step with cost lines, crew hours and rentals. Here the sources are written every
// way the app writes them (and some it does not), and the totals must equal the sums taken
// from the sources directly.

let co: TestCompany;
let jobs: { id: number; code: string }[];
let workerId: number;
beforeAll(async () => {
  co = await makeCompany();
  const cust = await makeCustomer(co.owner);
  jobs = [];
  for (const code of ['J-0701', 'J-0702', 'J-0703']) jobs.push(await makeJob(co.owner, cust.id, { code, status: 'building' }));
  workerId = (await ok(co.bookkeeper.post('/api/workers', { name: 'Tamsin Okafor', wageCents: 2800 }), 'worker')).id;
});
afterAll(closeTestDb);

const CATEGORIES = ['material', 'labour', 'rental', 'subcontract', 'permit', 'disposal', 'other'] as const;

describe('job cost totals', () => {
  it('equal the sums of their sources after random inserts, moves, re-categorising, repricing and deletes', async () => {
    const k = testDb();
    const jobId = fc.constantFrom(...jobs.map((j) => j.id as number | null), null);
    const op = fc.oneof(
      fc.record({ kind: fc.constant('add-line' as const), jobId, category: fc.constantFrom(...CATEGORIES), cents: fc.integer({ min: -50_000, max: 500_000 }) }),
      fc.record({ kind: fc.constant('move-line' as const), jobId, pick: fc.nat() }),
      fc.record({ kind: fc.constant('recat-line' as const), category: fc.constantFrom(...CATEGORIES), pick: fc.nat() }),
      fc.record({ kind: fc.constant('reprice-line' as const), cents: fc.integer({ min: -50_000, max: 500_000 }), pick: fc.nat() }),
      fc.record({ kind: fc.constant('drop-line' as const), pick: fc.nat() }),
      fc.record({ kind: fc.constant('add-time' as const), jobIdx: fc.nat({ max: 2 }), cents: fc.integer({ min: 0, max: 90_000 }) }),
      fc.record({ kind: fc.constant('drop-time' as const), pick: fc.nat() }),
      fc.record({ kind: fc.constant('add-rental' as const), jobIdx: fc.nat({ max: 2 }), cents: fc.option(fc.integer({ min: 0, max: 40_000 })) }),
      fc.record({ kind: fc.constant('price-rental' as const), cents: fc.option(fc.integer({ min: 0, max: 40_000 })), pick: fc.nat() }),
      fc.record({ kind: fc.constant('drop-rental' as const), pick: fc.nat() }),
    );
    const pickId = async (table: string, n: number) => {
      const ids = (await k(table).where('organization_id', co.id).orderBy('id').pluck('id')) as number[];
      return ids.length ? ids[n % ids.length] : null;
    };
    await fc.assert(
      fc.asyncProperty(fc.array(op, { minLength: 5, maxLength: 25 }), async (ops) => {
        for (const o of ops) {
          if (o.kind === 'add-line') {
            await k('cost_lines').insert({ organization_id: co.id, source: 'manual', job_id: o.jobId, overhead: o.jobId === null, category: o.category, cost_date: '2026-11-02', amount_cents: o.cents });
          } else if (o.kind === 'move-line' || o.kind === 'recat-line' || o.kind === 'reprice-line' || o.kind === 'drop-line') {
            const id = await pickId('cost_lines', o.pick);
            if (id === null) continue;
            const q = k('cost_lines').where({ organization_id: co.id, id });
            if (o.kind === 'move-line') await q.update({ job_id: o.jobId });
            else if (o.kind === 'recat-line') await q.update({ category: o.category });
            else if (o.kind === 'reprice-line') await q.update({ amount_cents: o.cents });
            else await q.delete();
          } else if (o.kind === 'add-time') {
            await k('time_entries').insert({ organization_id: co.id, job_id: jobs[o.jobIdx].id, worker_id: workerId, work_date: '2026-11-02', hours: 4, task: 'dig_set_posts', wage_cents: 2800, burden_pct: 0, cost_cents: o.cents });
          } else if (o.kind === 'drop-time') {
            const id = await pickId('time_entries', o.pick);
            if (id !== null) await k('time_entries').where({ organization_id: co.id, id }).delete();
          } else if (o.kind === 'add-rental') {
            await k('rentals').insert({ organization_id: co.id, job_id: jobs[o.jobIdx].id, kind: 'earth_auger', start_at: '2026-11-02 07:00:00', end_at: '2026-11-02 12:00:00', half_days: 1, cost_cents: o.cents });
          } else if (o.kind === 'price-rental' || o.kind === 'drop-rental') {
            const id = await pickId('rentals', o.pick);
            if (id === null) continue;
            const q = k('rentals').where({ organization_id: co.id, id });
            if (o.kind === 'price-rental') await q.update({ cost_cents: o.cents });
            else await q.delete();
          }
        }
        expect(await costTotalsDrift(co.id)).toEqual([]);
      }),
      { numRuns: 15, seed: 20261202 },
    );
  }, 240_000);

  it('roll back with the transaction that wrote the lines', async () => {
    const k = testDb();
    const before = await k('job_cost_totals').where({ organization_id: co.id, job_id: jobs[0].id, category: 'material' }).first('amount_cents');
    await expect(k.transaction(async (trx) => {
      await trx('cost_lines').insert({ organization_id: co.id, source: 'manual', job_id: jobs[0].id, overhead: false, category: 'material', cost_date: '2026-11-02', amount_cents: 123_456 });
      throw new Error('changed my mind');
    })).rejects.toThrow('changed my mind');
    const after = await k('job_cost_totals').where({ organization_id: co.id, job_id: jobs[0].id, category: 'material' }).first('amount_cents');
    expect(after?.amount_cents ?? null).toEqual(before?.amount_cents ?? null);
    expect(await costTotalsDrift(co.id)).toEqual([]);
  });

  it('go with a job that is deleted, while its unassigned lines stay out of every job', async () => {
    const cust = await makeCustomer(co.owner);
    const doomed = await makeJob(co.owner, cust.id, { code: 'J-0799', status: 'lead' });
    await testDb()('cost_lines').insert({ organization_id: co.id, source: 'manual', job_id: doomed.id, overhead: false, category: 'permit', cost_date: '2026-11-02', amount_cents: 9_900 });
    expect(await testDb()('job_cost_totals').where({ job_id: doomed.id }).first('amount_cents')).toMatchObject({ amount_cents: 9_900 });
    await testDb()('jobs').where({ organization_id: co.id, id: doomed.id }).delete();
    expect(await testDb()('job_cost_totals').where({ job_id: doomed.id })).toHaveLength(0);
    expect(await costTotalsDrift(co.id)).toEqual([]);
  });
});
