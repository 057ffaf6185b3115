import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as ss from 'simple-statistics';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { styleId } from '../setup/bids';
import { buildJobs, type BuiltJob } from '../setup/margins';

let co: TestCompany;
let other: TestCompany;
let jobs: BuiltJob[];
let wood: number;
let chain: number;

beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  const day = (n: number) => `2026-0${1 + (n % 8)}-1${n % 9}`;
  jobs = await buildJobs(co, [
    ...[1.3, 1.25, 1.35, 1.3, 1.28].map((labour, i) => ({ style: 'wood_privacy' as const, status: 'completed' as const, lengthFt: 60 + i * 25, labour, completedDate: day(i) })),
    ...[1.4, 1.45, 1.35, 1.4, 1.5].map((concrete, i) => ({ style: 'chain_link' as const, status: 'completed' as const, lengthFt: 80 + i * 30, concrete, completedDate: day(i + 3) })),
    { style: 'wood_privacy', status: 'building', lengthFt: 90, labour: 0.5 },
  ]);
  [wood, chain] = [await styleId(co.owner, 'wood_privacy'), await styleId(co.owner, 'chain_link')];
}, 600_000);
afterAll(closeTestDb);

const styleOf = (body: any, id: number) => body.styles.find((s: { styleId: number }) => s.styleId === id);
const itemOf = (body: any, id: number, key: string) => styleOf(body, id).items.find((i: { key: string }) => i.key === key);

/** Achieved crew-hours per hole on each finished job of a style, straight from the rows. */
async function achievedPosts(style: number): Promise<number[]> {
  const [rows] = await testDb().raw(
    `SELECT b.hole_count, b.crew_size, (SELECT SUM(t.hours) FROM time_entries t WHERE t.job_id = j.id AND t.task = 'dig_set_posts') AS hours
       FROM jobs j JOIN bids b ON b.job_id = j.id AND b.status = 'accepted'
      WHERE j.organization_id = ? AND j.status IN ('completed', 'closed') AND b.style_id = ?`, [co.id, style]);
  return (rows as { hole_count: number; crew_size: number; hours: string }[]).map((r) => Number(r.hours) / r.crew_size / r.hole_count);
}

describe('calibration suggestions and their backtest', () => {
  it('suggests the median achieved rate, equal to one worked out from the rows', async () => {
    const r = await co.estimator.get('/api/calibration');
    expect(r.status).toBe(200);
    const posts = itemOf(r.body, wood, 'labour:posts');
    const achieved = await achievedPosts(wood);
    expect(posts.n).toBe(5);
    expect(posts.suggested).toBeCloseTo(ss.median(achieved), 4);
    const [[snap]] = await testDb().raw("SELECT SUM(s.value) AS v FROM bid_rate_snapshots s WHERE s.bid_id = ? AND s.kind IN ('hole_hours', 'post_set_hours')", [jobs[0].bidId]);
    expect(posts.bidMedian).toBeCloseTo(Number(snap.v), 4);
    expect(posts.ratio.median).toBeGreaterThan(1.25);
    expect(posts.ratio.median).toBeLessThan(1.35);
    expect(posts.applicable).toBe(true);
    expect(posts.backtest.suggested.mape).toBeLessThan(posts.backtest.current.mape);
    // Bids ran low: a negative bias today, closer to nothing with the suggestions.
    const w = styleOf(r.body, wood);
    expect(w.backtest.current.bias).toBeLessThan(0);
    expect(w.backtest.suggested.mape).toBeLessThan(w.backtest.current.mape);
    // The chain-link crews worked to their bids: nothing to apply on labour.
    expect(itemOf(r.body, chain, 'labour:rails_infill').applicable).toBe(false);
  });

  it('finds the concrete chain-link jobs bought over their takeoff', async () => {
    const r = await co.estimator.get('/api/calibration');
    const conc = itemOf(r.body, chain, 'waste:concrete');
    const [rows] = await testDb().raw(
      `SELECT l.buy_qty, l.takeoff_qty, l.waste_pct, (SELECT SUM(c.quantity) FROM cost_lines c WHERE c.job_id = b.job_id AND c.sku = l.sku) AS bought
         FROM bids b JOIN bid_lines l ON l.bid_id = b.id AND l.sku = 'CONC-50' JOIN jobs j ON j.id = b.job_id
        WHERE b.organization_id = ? AND b.status = 'accepted' AND b.style_id = ? AND j.status = 'completed'`, [co.id, chain]);
    const achieved = (rows as Record<string, string>[]).map((x) => ((1 + Number(x.waste_pct) / 100) * Number(x.bought)) / Number(x.buy_qty) - 1);
    expect(conc.n).toBe(5);
    expect(conc.suggested).toBeCloseTo(Math.min(0.5, ss.median(achieved)) * 100, 1);
    expect(conc.boughtToTakeoffMedian).toBeGreaterThan(1.3);
    expect(conc.applicable).toBe(true);
  });

  it('leaves a job out by hand with a reason, and counts it again', async () => {
    const e = await co.estimator.post('/api/calibration/exclusions', { jobId: jobs[0].jobId, scope: 'labour:posts', reason: 'Rock ledge on the back run' });
    expect(e.status).toBe(201);
    expect(e.body).toMatchObject({ jobId: jobs[0].jobId, scope: 'labour:posts', reason: 'Rock ledge on the back run' });
    let r = await co.estimator.get('/api/calibration');
    expect(itemOf(r.body, wood, 'labour:posts').n).toBe(4);
    expect(itemOf(r.body, wood, 'labour:rails_infill').n).toBe(5);
    expect(itemOf(r.body, wood, 'labour:posts').jobs.find((j: { jobId: number }) => j.jobId === jobs[0].jobId).excluded).toBe('Rock ledge on the back run');
    expect((await co.estimator.post('/api/calibration/exclusions', { jobId: jobs[0].jobId, scope: 'labour:posts', reason: 'Again, twice' })).status).toBe(409);
    expect((await co.estimator.post('/api/calibration/exclusions', { jobId: jobs[10].jobId, scope: 'job', reason: 'Still building' })).status).toBe(422);
    const bad = await co.estimator.post('/api/calibration/exclusions', { jobId: jobs[1].jobId, scope: 'labour:everything', reason: 'x' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['scope', 'reason']));
    expect((await other.owner.post('/api/calibration/exclusions', { jobId: jobs[1].jobId, scope: 'job', reason: 'Not my job at all' })).status).toBe(404);
    expect((await other.owner.request('DELETE', `/api/calibration/exclusions/${e.body.id}`)).status).toBe(404);
    expect((await co.bookkeeper.post('/api/calibration/exclusions', { jobId: jobs[1].jobId, scope: 'job', reason: 'Not allowed to' })).status).toBe(403);
    expect((await co.estimator.request('DELETE', `/api/calibration/exclusions/${e.body.id}`)).status).toBe(204);
    r = await co.estimator.get('/api/calibration');
    expect(itemOf(r.body, wood, 'labour:posts').n).toBe(5);
  });

  it('weights recent jobs when asked, and refuses a nonsense half-life', async () => {
    const r = await co.estimator.get('/api/calibration?halfLifeDays=180');
    expect(r.status).toBe(200);
    expect(r.body.halfLifeDays).toBe(180);
    expect((await co.estimator.get('/api/calibration?halfLifeDays=2')).status).toBe(400);
  });

  it('is for the owner and the estimator; a bookkeeper or a crew lead gets 403', async () => {
    expect((await co.owner.get('/api/calibration')).status).toBe(200);
    expect((await co.bookkeeper.get('/api/calibration')).status).toBe(403);
    expect((await co.crew_lead.get('/api/calibration')).status).toBe(403);
    expect((await co.crew_lead.post('/api/calibration/apply', { styleId: wood, items: [], reason: 'nope' })).status).toBe(403);
    const theirs = await other.owner.get('/api/calibration');
    expect(theirs.body.styles).toEqual([]);
  });
});

describe('applying a suggestion', () => {
  it('refuses what the backtest does not support, what changed since, and bad input', async () => {
    const r = await co.estimator.get('/api/calibration');
    const posts = itemOf(r.body, wood, 'labour:posts');
    const stale = await co.estimator.post('/api/calibration/apply', { styleId: wood, items: [{ key: 'labour:posts', suggested: posts.suggested + 0.01 }], reason: 'Crews in clay run long' });
    expect(stale.status).toBe(409);
    const flat = itemOf(r.body, chain, 'labour:rails_infill');
    const no = await co.estimator.post('/api/calibration/apply', { styleId: chain, items: [{ key: 'labour:rails_infill', suggested: flat.suggested }], reason: 'Just because' });
    expect(no.status).toBe(422);
    expect(no.body.error.fields['items.0.key']).toMatch(/backtest/);
    const bad = await co.estimator.post('/api/calibration/apply', { styleId: wood, items: [{ key: 'labour:posts' }], reason: '' });
    expect(bad.status).toBe(400);
    expect((await co.estimator.post('/api/calibration/apply', { styleId: 987654321, items: [{ key: 'labour:posts', suggested: 1 }], reason: 'A style of nobody' })).status).toBe(404);
    expect((await co.bookkeeper.post('/api/calibration/apply', { styleId: wood, items: [{ key: 'labour:posts', suggested: posts.suggested }], reason: 'Not my call' })).status).toBe(403);
  });

  it('writes new rate versions with who and why, leaves saved bids alone, and the next bid uses them', async () => {
    const before = await co.estimator.get('/api/calibration');
    const posts = itemOf(before.body, wood, 'labour:posts');
    const rails = itemOf(before.body, wood, 'labour:rails_infill');
    const [oldSnap] = await testDb()('bid_rate_snapshots').where({ bid_id: jobs[0].bidId }).whereIn('kind', ['hole_hours', 'rails_infill_hours_per_ft']).orderBy('kind').select('kind', 'value');
    const r = await co.estimator.post('/api/calibration/apply', { styleId: wood, items: [{ key: 'labour:posts', suggested: posts.suggested }, { key: 'labour:rails_infill', suggested: rails.suggested }], reason: 'Crews in clay run long' });
    expect(r.status).toBe(200);
    expect(r.body.applied.map((a: { key: string }) => a.key)).toEqual(['labour:posts', 'labour:rails_infill']);
    const versions = await testDb()('labour_rate_versions as v').join('labour_rates as lr', 'lr.id', 'v.rate_id')
      .where({ 'lr.organization_id': co.id, 'lr.style_id': wood }).whereIn('lr.kind', ['hole_hours', 'post_set_hours', 'rails_infill_hours_per_ft']).orderBy('v.version_no', 'desc').select('lr.kind', 'v.value', 'v.reason', 'v.created_by', 'v.version_no');
    const latest = (kind: string) => versions.find((v) => v.kind === kind)!;
    expect(Number(latest('hole_hours').value) + Number(latest('post_set_hours').value)).toBeCloseTo(posts.suggested, 3);
    expect(Number(latest('rails_infill_hours_per_ft').value)).toBeCloseTo(rails.suggested, 4);
    expect(latest('hole_hours').version_no).toBeGreaterThan(1);
    expect(latest('hole_hours').reason).toMatch(/Calibrated from 5 finished jobs: Crews in clay run long/);
    expect(latest('hole_hours').created_by).toBe(co.userIds.estimator);
    // The history is visible where the rates live, and on the calibration page.
    const history = await co.estimator.get(`/api/rates/${wood}`);
    expect(history.body.history.some((h: { reason: string }) => /Crews in clay/.test(h.reason))).toBe(true);
    expect(r.body.applications[0]).toMatchObject({ styleId: wood, itemKey: 'labour:rails_infill', reason: 'Crews in clay run long', jobs: 5 });
    expect(r.body.applications[0].createdByName).toBeTruthy();
    // A saved bid keeps what it was priced with.
    const [snapNow] = await testDb()('bid_rate_snapshots').where({ bid_id: jobs[0].bidId }).whereIn('kind', ['hole_hours', 'rails_infill_hours_per_ft']).orderBy('kind').select('kind', 'value');
    expect(snapNow).toEqual(oldSnap);
    // Today's rates are now the suggestion, so the style's backtest error today is lower.
    const after = itemOf(r.body, wood, 'labour:posts');
    expect(after.current).toBeCloseTo(posts.suggested, 3);
    expect(styleOf(r.body, wood).backtest.current.mape).toBeLessThan(styleOf(before.body, wood).backtest.current.mape);
    // A new bid is priced with the new rates.
    const customer = await makeCustomer(co.owner);
    const job = await makeJob(co.owner, customer.id, { fenceStyleId: wood });
    const bid = await co.estimator.post(`/api/jobs/${job.id}/bids`, { styleId: wood, runs: [{ lengthFt: 100, heightIn: 72 }], gates: [], target: { mode: 'margin', pct: 30 } });
    expect(bid.status).toBe(201);
    const rate = (k: string) => bid.body.rates.find((x: { kind: string }) => x.kind === k).value;
    expect(rate('hole_hours') + rate('post_set_hours')).toBeCloseTo(posts.suggested, 3);
    expect(rate('rails_infill_hours_per_ft')).toBeCloseTo(rails.suggested, 4);
    const postsLine = bid.body.labour.find((l: { task: string }) => l.task === 'posts');
    expect(postsLine.crewHours).toBeCloseTo(bid.body.takeoff.holes * (rate('hole_hours') + rate('post_set_hours')), 3);
  });

  it('writes a waste percent into the style\'s recipe; the next bid buys by it', async () => {
    const r0 = await co.estimator.get('/api/calibration');
    const conc = itemOf(r0.body, chain, 'waste:concrete');
    const r = await co.owner.post('/api/calibration/apply', { styleId: chain, items: [{ key: 'waste:concrete', suggested: conc.suggested }], reason: 'Augered holes run wide in the sand' });
    expect(r.status).toBe(200);
    const style = await co.estimator.get(`/api/styles/${chain}`);
    expect(style.body.recipe.wastePct.concrete).toBe(conc.suggested);
    expect(itemOf(r.body, chain, 'waste:concrete').current).toBe(conc.suggested);
    const customer = await makeCustomer(co.owner);
    const job = await makeJob(co.owner, customer.id, { fenceStyleId: chain });
    const bid = await co.estimator.post(`/api/jobs/${job.id}/bids`, { styleId: chain, runs: [{ lengthFt: 100, heightIn: 48 }], gates: [], target: { mode: 'margin', pct: 30 } });
    expect(bid.body.lines.find((l: { sku: string }) => l.sku === 'CONC-50').wastePct).toBe(conc.suggested);
  });
});
