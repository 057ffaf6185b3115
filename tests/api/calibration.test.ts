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

  it('calibrates the hours a rental day covers from the digging each job took and the auger days it rented', async () => {
    // Without a dig rental on record there is nothing to go on, and the item says so.
    let r = await co.estimator.get('/api/calibration');
    expect(itemOf(r.body, wood, 'rental:day_hours')).toMatchObject({ n: 0, suggested: null });
    expect(itemOf(r.body, wood, 'rental:day_hours').reason).toMatch(/Only 0 finished jobs/);
    // Two auger days on each finished wood job, and a trailer day that is not digging equipment.
    const wj = jobs.filter((j) => j.spec.style === 'wood_privacy' && j.spec.status === 'completed');
    await testDb()('rentals').insert(wj.flatMap((j) => [
      { organization_id: co.id, job_id: j.jobId, kind: 'earth_auger', start_at: '2026-03-02 07:00', end_at: '2026-03-03 15:00', days: 2, cost_cents: null },
      { organization_id: co.id, job_id: j.jobId, kind: 'trailer', start_at: '2026-03-02 07:00', end_at: '2026-03-02 15:00', days: 1, cost_cents: null },
    ]));
    try {
      // Worked from the rows apart from the app: the bid's digging hours (its takeoff's rental
      // rule covers them) × the posts task's logged ÷ bid person-hours, ÷ 2 days.
      const [rows] = await testDb().raw(
        `SELECT b.takeoff, (SELECT l.man_hours FROM bid_labour l WHERE l.bid_id = b.id AND l.task = 'posts') AS bid_h,
           (SELECT SUM(t.hours) FROM time_entries t WHERE t.job_id = j.id AND t.task = 'dig_set_posts') AS logged_h
         FROM jobs j JOIN bids b ON b.job_id = j.id AND b.status = 'accepted' WHERE j.organization_id = ? AND j.status = 'completed' AND b.style_id = ?`, [co.id, wood]);
      const achieved = (rows as { takeoff: string | { rentals: { coversHours: number }[] }; bid_h: string; logged_h: string }[]).map((x) => {
        const t = typeof x.takeoff === 'string' ? JSON.parse(x.takeoff) : x.takeoff;
        return (t.rentals[0].coversHours * (Number(x.logged_h) / Number(x.bid_h))) / 2;
      });
      r = await co.estimator.get('/api/calibration');
      const item = itemOf(r.body, wood, 'rental:day_hours');
      expect(item.n).toBe(5);
      expect(item.kind).toBe('rental');
      expect(item.rateKinds).toEqual(['rental_day_hours']);
      expect(item.suggested).toBeCloseTo(ss.median(achieved), 1);
      expect(item.suggestedValues.rental_day_hours).toBe(item.suggested);
    } finally {
      await testDb()('rentals').whereIn('job_id', wj.map((j) => j.jobId)).delete();
    }
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

  it('refuses a waste suggestion when the same waste was changed while it waited for the style', async () => {
    const r0 = await co.estimator.get('/api/calibration');
    const conc = itemOf(r0.body, chain, 'waste:concrete');
    const { result } = await whileStyleLocked(chain, (recipe) => ({ ...recipe, wastePct: { ...recipe.wastePct, concrete: 12 } }),
      () => co.owner.post('/api/calibration/apply', { styleId: chain, items: [{ key: 'waste:concrete', suggested: conc.suggested }], reason: 'Augered holes run wide in the sand' }));
    expect(result.status).toBe(409);
    expect((await co.estimator.get(`/api/styles/${chain}`)).body.recipe.wastePct.concrete).toBe(12);
  });

  it('writes a waste percent into the style\'s recipe under its row lock, keeps a waste version, and the next bid buys by it', async () => {
    const r0 = await co.estimator.get('/api/calibration');
    const conc = itemOf(r0.body, chain, 'waste:concrete');
    const before = conc.currentValues.concrete;
    // Someone saves the style's gravel waste while the apply waits for the row: both changes stand.
    const { result: r } = await whileStyleLocked(chain, (recipe) => ({ ...recipe, wastePct: { ...recipe.wastePct, gravel: 17 } }),
      () => co.owner.post('/api/calibration/apply', { styleId: chain, items: [{ key: 'waste:concrete', suggested: conc.suggested }], reason: 'Augered holes run wide in the sand' }));
    expect(r.status).toBe(200);
    const style = await co.estimator.get(`/api/styles/${chain}`);
    expect(style.body.recipe.wastePct.concrete).toBe(conc.suggested);
    expect(style.body.recipe.wastePct.gravel).toBe(17);
    expect(itemOf(r.body, chain, 'waste:concrete').current).toBe(conc.suggested);
    // The history: old, new, who, when and why, as labour rate versions keep them.
    const versions = await testDb()('waste_versions').where({ organization_id: co.id, style_id: chain, waste_key: 'concrete' }).orderBy('version_no', 'desc');
    expect(versions[0]).toMatchObject({ created_by: co.userIds.owner });
    expect(Number(versions[0].old_pct)).toBe(before);
    expect(Number(versions[0].new_pct)).toBe(conc.suggested);
    expect(versions[0].reason).toMatch(/Calibrated from 5 finished jobs: Augered holes run wide in the sand/);
    expect(versions[0].created_at).toBeInstanceOf(Date);
    const shown = r.body.wasteHistory[String(chain)].find((h: { wasteKey: string }) => h.wasteKey === 'concrete');
    expect(shown).toMatchObject({ oldPct: before, newPct: conc.suggested, reason: versions[0].reason });
    expect(shown.createdByName).toBeTruthy();
    expect(r.body.currency).toBe('USD');
    // A hand edit of the style's waste is kept the same way.
    const edited = await co.owner.patch(`/api/styles/${chain}`, { recipe: { ...style.body.recipe, wastePct: { ...style.body.recipe.wastePct, posts: 3 } } });
    expect(edited.status).toBe(200);
    const hand = await testDb()('waste_versions').where({ organization_id: co.id, style_id: chain, waste_key: 'posts' }).orderBy('version_no', 'desc').first();
    expect(Number(hand.new_pct)).toBe(3);
    expect(Number(hand.old_pct)).toBe(style.body.recipe.wastePct.posts);
    expect(hand.reason).toMatch(/by hand/);
    const customer = await makeCustomer(co.owner);
    const job = await makeJob(co.owner, customer.id, { fenceStyleId: chain });
    const bid = await co.estimator.post(`/api/jobs/${job.id}/bids`, { styleId: chain, runs: [{ lengthFt: 100, heightIn: 48 }], gates: [], target: { mode: 'margin', pct: 30 } });
    expect(bid.body.lines.find((l: { sku: string }) => l.sku === 'CONC-50').wastePct).toBe(conc.suggested);
  });
});

/**
 * Holds the style's row lock in a transaction of our own, starts `request`, waits until it is
 * blocked on that lock, then writes `edit` of the recipe and commits: what a concurrent save of
 * the style looks like to the request.
 */
async function whileStyleLocked<T>(style: number, edit: (recipe: any) => any, request: () => Promise<T>): Promise<{ result: T }> {
  const trx = await testDb().transaction();
  let pending: Promise<T> | undefined;
  try {
    const row = await trx('fence_styles').where({ id: style }).forUpdate().first('recipe');
    let settled: unknown;
    pending = request();
    void pending.then((r) => { settled = r; }, () => undefined);
    const deadline = Date.now() + 30_000;
    for (;;) {
      // Answered without waiting for the row: say what it answered instead of timing out.
      if (settled !== undefined) throw new Error(`the request answered before it waited for the style lock: ${JSON.stringify((settled as { status?: number; body?: unknown }).body ?? settled).slice(0, 500)}`);
      // The request's locking read, running on another connection. MariaDB may block it on the
      // row while still planning it (state "Statistics", where a unique lookup reads its row),
      // before InnoDB lists its transaction as waiting, so the process list is what to watch.
      const [waits] = await testDb().raw("SELECT COUNT(*) AS n FROM information_schema.processlist WHERE id <> CONNECTION_ID() AND command = 'Query' AND info LIKE '%fence_styles%for update%'");
      if (Number(waits[0].n) > 0) break;
      if (Date.now() > deadline) {
        const [trxs] = await testDb().raw('SELECT trx_state, trx_started, trx_wait_started, LEFT(trx_query, 200) AS q FROM information_schema.innodb_trx');
        const [procs] = await testDb().raw("SELECT id, command, time, state, LEFT(info, 160) AS q FROM information_schema.processlist WHERE command <> 'Sleep'");
        throw new Error(`the request never waited for the style lock; transactions: ${JSON.stringify(trxs)}; processes: ${JSON.stringify(procs)}`);
      }
      await new Promise((res) => setTimeout(res, 50));
    }
    const recipe = typeof row.recipe === 'string' ? JSON.parse(row.recipe) : row.recipe;
    await trx('fence_styles').where({ id: style }).update({ recipe: JSON.stringify(edit(recipe)) });
    await trx.commit();
  } catch (e) {
    await trx.rollback();
    if (pending) await pending.catch(() => undefined);
    throw e;
  }
  return { result: await pending! };
}
