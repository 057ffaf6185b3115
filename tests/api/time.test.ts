import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { costTotalsDrift } from '../setup/cost-totals';
import { labourCostCents } from '../../src/lib/labour/cost';
import { ok, upload } from './receipts-helpers';

let co: TestCompany;
let other: TestCompany;
let mine: { id: number; code: string };
let theirs: { id: number; code: string };
let lead: { id: number };
let hand: { id: number };

beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  const cust = await makeCustomer(co.owner);
  mine = await makeJob(co.owner, cust.id, { code: 'J-0401', status: 'building', crewLeadUserId: co.userIds.crew_lead });
  theirs = await makeJob(co.owner, cust.id, { code: 'J-0402', status: 'building' });
  lead = await ok(co.bookkeeper.post('/api/workers', { name: 'Rowan Tellier', wageCents: '31.00', crewLeadUserId: co.userIds.crew_lead }), 'worker');
  hand = await ok(co.bookkeeper.post('/api/workers', { name: 'Ines Marchetti', wageCents: 2250 }), 'worker');
  await ok(co.owner.request('PATCH', '/api/settings', { json: { labourBurdenPct: 28 } }), 'burden');
});
afterAll(async () => {
  // Every write above went through the app: the reports' cost totals must still equal their sources.
  expect(await costTotalsDrift(co.id)).toEqual([]);
  await closeTestDb();
});

const MONEY = /wage|cost|cents|rate|price/i;
function moneyKeys(value: unknown, path = ''): string[] {
  if (Array.isArray(value)) return value.flatMap((v, i) => moneyKeys(v, `${path}[${i}]`));
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => [...(MONEY.test(k) ? [`${path}.${k}`] : []), ...moneyKeys(v, `${path}.${k}`)]);
  return [];
}

describe('crew hours', () => {
  it('a crew lead logs the crew’s day on an assigned job and sees hours, never wages or costs', async () => {
    const r = await co.crew_lead.post('/api/time', { jobId: mine.id, date: '2026-05-04', task: 'dig_set_posts', workers: [{ workerId: lead.id, hours: '7.5' }, { workerId: hand.id, hours: 8 }] });
    expect(r.status, r.text).toBe(201);
    expect(r.body.items.map((e: { workerName: string; hours: number }) => [e.workerName, e.hours])).toEqual([['Rowan Tellier', 7.5], ['Ines Marchetti', 8]]);
    expect(moneyKeys(r.body)).toEqual([]);
    for (const path of ['/api/time', '/api/time/options', '/api/rentals']) {
      const res = await co.crew_lead.get(path);
      expect(res.status, path).toBe(200);
      expect(moneyKeys(res.body), path).toEqual([]);
    }
    const page = await co.crew_lead.request('GET', `/jobs/${mine.id}`, { headers: { accept: 'text/html' } });
    expect(page.status).toBe(200);
    expect(page.text).toContain('Crew hours on this job');
    expect(page.text).not.toMatch(/\$\d/);
  });

  it('costs each entry at hours × wage × (1 + burden) for the office', async () => {
    const list = await ok(co.bookkeeper.get(`/api/time?job=${mine.id}`), 'list');
    const rowan = list.items.find((e: { workerName: string }) => e.workerName === 'Rowan Tellier');
    expect(rowan).toMatchObject({ wageCents: 3100, costCents: labourCostCents({ hours: 7.5, wageCents: 3100, burdenPct: 28 }) });
    // $31.00 × 7.5 h × 1.28 = $297.60; $22.50 × 8 h × 1.28 = $230.40 [calc]
    expect(list.costCents).toBe(29760 + 23040);
    const costing = await ok(co.owner.get(`/api/jobs/${mine.id}/costing`), 'costing');
    expect(costing.categories.find((c: { category: string }) => c.category === 'labour').actualCents).toBe(29760 + 23040);
    expect(costing.hoursByTask.find((h: { task: string }) => h.task === 'dig_set_posts').hours).toBe(15.5);
  });

  it('keeps a crew lead off another crew’s job, and another company out', async () => {
    const r = await co.crew_lead.post('/api/time', { jobId: theirs.id, date: '2026-05-04', task: 'gates', workers: [{ workerId: hand.id, hours: 2 }] });
    expect(r.status).toBe(404);
    const byOffice = await ok(co.bookkeeper.post('/api/time', { jobId: theirs.id, date: '2026-05-04', task: 'gates', workers: [{ workerId: hand.id, hours: 2 }] }), 'office');
    const id = byOffice.items[0].id;
    expect((await co.crew_lead.get(`/api/time?job=${theirs.id}`)).body.total).toBe(0);
    expect((await co.crew_lead.patch(`/api/time/${id}`, { hours: 3 })).status).toBe(404);
    expect((await co.crew_lead.delete(`/api/time/${id}`)).status).toBe(404);
    expect((await co.crew_lead.get('/api/time/options')).body.jobs.map((j: { id: number }) => j.id)).toEqual([mine.id]);
    expect((await other.bookkeeper.patch(`/api/time/${id}`, { hours: 3 })).status).toBe(404);
    const foreignWorker = await co.bookkeeper.post('/api/time', { jobId: mine.id, date: '2026-05-04', task: 'gates', workers: [{ workerId: (await ok(other.bookkeeper.post('/api/workers', { name: 'Else', wageCents: 2000 }), 'w')).id, hours: 2 }] });
    expect(foreignWorker.status).toBe(400);
    expect(foreignWorker.body.error.fields['workers.0.workerId']).toBeTruthy();
  });

  it('refuses bad hours and unknown tasks with field errors', async () => {
    const r = await co.crew_lead.post('/api/time', { jobId: mine.id, date: '2026-13-01', task: 'juggling', workers: [{ workerId: lead.id, hours: '25' }] });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['date', 'task', 'workers.0.hours']);
    const lost = await makeJob(co.owner, (await makeCustomer(co.owner)).id, { status: 'lost', crewLeadUserId: co.userIds.crew_lead });
    expect((await co.crew_lead.post('/api/time', { jobId: lost.id, date: '2026-05-04', task: 'gates', workers: [{ workerId: lead.id, hours: 1 }] })).status).toBe(422);
  });

  it('keeps wages behind workers:read', async () => {
    expect((await co.crew_lead.get('/api/workers')).status).toBe(403);
    expect((await co.estimator.get('/api/workers')).status).toBe(403);
    expect((await co.crew_lead.post('/api/workers', { name: 'Me', wageCents: 100000 })).status).toBe(403);
    const raise = await ok(co.bookkeeper.patch(`/api/workers/${hand.id}`, { wageCents: '24.00' }), 'raise');
    expect(raise.wageCents).toBe(2400);
    // Entries logged before the raise keep the wage they were costed at.
    const [[e]] = await testDb().raw('SELECT wage_cents FROM time_entries WHERE worker_id = ? ORDER BY id LIMIT 1', [hand.id]);
    expect(Number(e.wage_cents)).toBe(2250);
  });
});

describe('rentals', () => {
  it('prices a crew lead’s rental from the rate card at the cheapest periods, and shows the lead no money', async () => {
    await ok(co.bookkeeper.request('PUT', '/api/rentals/rates', { json: { rates: [{ kind: 'earth_auger', halfDayCents: '65.00', dayCents: '90.00', weekCents: '360.00' }] } }), 'rate card');
    const r = await co.crew_lead.post('/api/rentals', { jobId: mine.id, kind: 'earth_auger', startAt: '2026-05-04T07:00', endAt: '2026-05-09T07:00', dayCents: 1 });
    expect(r.status, r.text).toBe(201);
    expect(moneyKeys(r.body)).toEqual([]);
    expect(r.body.hours).toBe(120);
    const seen = await ok(co.bookkeeper.get(`/api/rentals/${r.body.id}`), 'rental');
    // Five days at $90 is $450; the week is $360 (rates the crew lead sent are ignored).
    expect(seen).toMatchObject({ dayCents: 9000, plan: { weeks: 1, days: 0, halfDays: 0 }, costCents: 36000 });
    expect((await co.crew_lead.get('/api/rentals/rates')).status).toBe(403);
  });

  it('takes the office’s own rates, delivery and fuel, and leaves a rental without rates unpriced', async () => {
    const r = await ok(co.bookkeeper.post('/api/rentals', { jobId: theirs.id, kind: 'skid_steer', startAt: '2026-05-06 07:00', endAt: '2026-05-06 15:30', halfDayCents: '195', dayCents: '295', deliveryCents: '95.00', fuelCents: '32.00' }), 'skid');
    expect(r).toMatchObject({ plan: { weeks: 0, days: 1, halfDays: 0 }, costCents: 29500 + 9500 + 3200 });
    const unpriced = await ok(co.bookkeeper.post('/api/rentals', { jobId: theirs.id, kind: 'other', description: 'Post puller', startAt: '2026-05-07T07:00', endAt: '2026-05-07T11:00' }), 'other');
    expect(unpriced.costCents).toBeNull();
    const costing = await ok(co.owner.get(`/api/jobs/${theirs.id}/costing`), 'costing');
    expect(costing.categories.find((c: { category: string }) => c.category === 'rental').actualCents).toBe(42200);
    expect(costing.unpricedRentals).toBe(1);
    const backwards = await co.bookkeeper.post('/api/rentals', { jobId: theirs.id, kind: 'trailer', startAt: '2026-05-07T07:00', endAt: '2026-05-06T07:00' });
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.fields.endAt).toBeTruthy();
    expect((await co.crew_lead.post('/api/rentals', { jobId: theirs.id, kind: 'trailer', startAt: '2026-05-07T07:00', endAt: '2026-05-07T09:00' })).status).toBe(404);
    expect((await other.owner.get(`/api/rentals/${unpriced.id}`)).status).toBe(404);
  });
});

describe('timesheets from CSV', () => {
  it('imports a crew’s timesheet through the same machinery, refusing unknown workers by row', async () => {
    const text = ['Date,Employee,Job,Hours,Task', '5/11/2026,Ines Marchetti,J-0402,8,Rails and infill', '5/11/2026,Nobody Known,J-0402,8,Gates', '5/12/2026,Ines Marchetti,PO 402,6.5,clean up', '5/12/2026,Ines Marchetti,J-9999,2,Gates'].join('\n');
    expect((await upload(co.crew_lead, '/api/time/imports', { name: 't.csv', content: text })).status).toBe(403);
    const r = await upload(co.bookkeeper, '/api/time/imports', { name: 'ines-may.csv', content: text });
    expect(r.status, r.text).toBe(201);
    expect(r.body.counts).toMatchObject({ lines: 2, errors: 2 });
    const problems = await ok(co.bookkeeper.get(`/api/time/imports/${r.body.id}/lines?state=error`), 'problems');
    expect(problems.items.map((l: { rowNumber: number; reason: string }) => [l.rowNumber, l.reason])).toEqual([
      [3, 'no worker named "Nobody Known" (add them on the Workers page)'],
      [5, 'job "J-9999": no job with that code or PO number'],
    ]);
    const c = await ok(co.bookkeeper.post(`/api/time/imports/${r.body.id}/commit`, {}), 'commit');
    // $24.00 × 14.5 h × 1.28 = $445.44 [calc]
    expect(c.summary).toMatchObject({ added: 2, addedCents: 44544 });
    const again = await upload(co.bookkeeper, '/api/time/imports', { name: 'copy.csv', content: text });
    expect((await ok(co.bookkeeper.post(`/api/time/imports/${again.body.id}/commit`, {}), 'again')).summary.added).toBe(0);
    expect((await co.bookkeeper.get(`/api/receipts/imports/${r.body.id}`)).status).toBe(404);
  });
});
