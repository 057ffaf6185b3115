import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { styleId } from '../setup/bids';
import type { Res } from '../setup/client';
import { DEFAULT_RATES, DEFAULT_RECIPES } from '../../src/lib/takeoff/defaults';
import { ok } from './receipts-helpers';

// One request must never hold the server: each answer here comes within a hang detector
// (10 s, far beyond what these requests take, so a busy machine does not trip it), and a
// health check sent alongside answers too.

let co: TestCompany;
let mine: { id: number };

beforeAll(async () => {
  co = await makeCompany();
  const cust = await makeCustomer(co.owner);
  mine = await makeJob(co.owner, cust.id, { status: 'building', crewLeadUserId: co.userIds.crew_lead });
  await ok(co.bookkeeper.request('PUT', '/api/rentals/rates', { json: { rates: [{ kind: 'earth_auger', halfDayCents: '65.00', dayCents: '90.00', weekCents: '360.00' }] } }), 'rate card');
});
afterAll(closeTestDb);

const HANG_MS = 10_000;
async function answered<T>(p: Promise<Res<T>>, what: string): Promise<Res<T>> {
  let timer: NodeJS.Timeout | undefined;
  const hang = new Promise<never>((_, reject) => { timer = setTimeout(() => reject(new Error(`${what}: no answer in ${HANG_MS / 1000} s`)), HANG_MS); });
  try { return await Promise.race([p, hang]); } finally { clearTimeout(timer); }
}

/** The request, and a health check sent while it is in flight; both must answer. */
async function withHealth<T>(p: Promise<Res<T>>, what: string): Promise<Res<T>> {
  const [r, health] = await Promise.all([answered(p, what), answered(co.owner.get('/api/health'), `/api/health during ${what}`)]);
  expect(health.status).toBe(200);
  return r;
}

const rentalsOnJob = async () => Number((await testDb()('rentals').where({ organization_id: co.id, job_id: mine.id }).count({ n: '*' }))[0].n);

describe('a rental that spans centuries', () => {
  it('is refused at once with both dates named, and the server keeps answering', async () => {
    const before = await rentalsOnJob();
    const r = await withHealth(co.crew_lead.post('/api/rentals', { jobId: mine.id, kind: 'earth_auger', startAt: '0001-01-01T07:00', endAt: '9999-12-31T17:00' }), 'a 10,000-year rental');
    expect(r.status, r.text).toBe(400);
    expect(r.body.error.fields.startAt).toMatch(/between the years 1900 and 2200/);
    expect(r.body.error.fields.endAt).toMatch(/between the years 1900 and 2200/);
    expect(await rentalsOnJob()).toBe(before);
  });

  it('is refused within the years a date may take, naming the return and the 366-day limit', async () => {
    const before = await rentalsOnJob();
    const r = await withHealth(co.crew_lead.post('/api/rentals', { jobId: mine.id, kind: 'earth_auger', startAt: '1900-01-01T00:00', endAt: '2200-12-31T23:59' }), 'a 300-year rental');
    expect(r.status, r.text).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(['endAt']);
    expect(r.body.error.fields.endAt).toMatch(/at most 366 days/);
    // A minute over the limit is over it.
    const over = await answered(co.crew_lead.post('/api/rentals', { jobId: mine.id, kind: 'earth_auger', startAt: '2026-01-05T07:00', endAt: '2027-01-06T07:01' }), 'a rental a minute over');
    expect(over.status).toBe(400);
    expect(over.body.error.fields.endAt).toMatch(/at most 366 days/);
    // A date that does not exist is named, not rolled into March.
    const feb = await answered(co.crew_lead.post('/api/rentals', { jobId: mine.id, kind: 'earth_auger', startAt: '2026-02-31T07:00', endAt: '2026-03-04T07:00' }), 'a rental from 31 February');
    expect(feb.status).toBe(400);
    expect(Object.keys(feb.body.error.fields)).toEqual(['startAt']);
    expect(await rentalsOnJob()).toBe(before);
  });

  it('prices the longest rental allowed, 366 days, from the rate card', async () => {
    // 2026-01-05 07:00 to 2027-01-06 07:00 is 366 days (2026 is not a leap year) = 52 weeks and
    // 2 days: 52 × $360 + 2 × $90 = $18,900, under 53 weeks ($19,080) or 366 days ($32,940).
    const r = await withHealth(co.crew_lead.post('/api/rentals', { jobId: mine.id, kind: 'earth_auger', startAt: '2026-01-05T07:00', endAt: '2027-01-06T07:00' }), 'a 366-day rental');
    expect(r.status, r.text).toBe(201);
    expect(r.body.hours).toBe(366 * 24);
    const seen = await ok(co.bookkeeper.get(`/api/rentals/${r.body.id}`), 'rental');
    expect(seen).toMatchObject({ plan: { weeks: 52, days: 2, halfDays: 0, rentCents: 1_890_000 }, costCents: 1_890_000 });
    // Moved to span centuries, it is refused and stays as it was.
    const moved = await answered(co.crew_lead.request('PUT', `/api/rentals/${r.body.id}`, { json: { jobId: mine.id, kind: 'earth_auger', startAt: '0001-01-01T07:00', endAt: '9999-12-31T17:00' } }), 'moving the rental');
    expect(moved.status).toBe(400);
    expect(await ok(co.bookkeeper.get(`/api/rentals/${r.body.id}`), 'rental')).toMatchObject({ startAt: seen.startAt, endAt: seen.endAt, costCents: 1_890_000 });
  });
});

describe('the largest takeoff the API accepts', () => {
  // The limits of src/lib/takeoff/input.ts: 60 runs of 2,000 ft and 30 gates. Gates of 4 ft at
  // the start of the first 30 runs leave 1,996 ft of fence there.
  const runs = Array.from({ length: 60 }, () => ({ lengthFt: 2000, heightIn: 42 }));
  const gates = Array.from({ length: 30 }, (_, i) => ({ runIndex: i, widthFt: 4, offsetFt: 0 }));
  type Cut = { group: string; stockFt: number; pieces: number[]; count: number };
  const cuts = (cutList: Cut[], group: string) => cutList.filter((c) => c.group === group).map((c) => ({ stockFt: c.stockFt, pieces: c.pieces, count: c.count }));
  const pieceCount = (cutList: Cut[], group: string) => cuts(cutList, group).reduce((a, c) => a + c.count * c.pieces.length, 0);

  it('answers the wire-panel style with every piece cut once on the fewest boards', async () => {
    const wire = await styleId(co.estimator, 'wire_panel');
    const r = await withHealth(co.estimator.post('/api/takeoff', { styleId: wire, runs, gates }), 'the largest wire-panel takeoff');
    expect(r.status, r.text.slice(0, 500)).toBe(200);
    const t = r.body.takeoff;
    // 8 ft bays: 2,000 ft is 250 bays; 1,996 ft is 250 bays of 7.984 ft (95.808 in).
    expect(t.bays).toBe(60 * 250);
    // 251 posts on a free run; a gated run has the gate's far post too.
    expect(t.posts.total).toBe(30 * 251 + 30 * 252);
    // Posts cut from 10 ft stock in halves: (120 − ⅛ kerf) ÷ 2 = 59.9375 in, two to a board
    // (42 in above grade, 17.9375 in below).
    expect(cuts(t.cutList, 'posts')).toEqual([{ stockFt: 10, pieces: [59.9375, 59.9375], count: (30 * 251 + 30 * 252) / 2 }]);
    // Two rails a bay. A 96 in rail and a 95.808 in rail share a 16 ft board (191.933 in with
    // the kerf); two 96 in rails do not (192.125 in), so no board holds more than two and
    // 30,000 rails need at least 15,000 boards: these are they.
    expect(pieceCount(t.cutList, 'rails')).toBe(2 * 15_000);
    expect(cuts(t.cutList, 'rails')).toEqual([{ stockFt: 16, pieces: [96, 95.808], count: 15_000 }]);
    // One cap board a bay, the same way.
    expect(cuts(t.cutList, 'cap')).toEqual([{ stockFt: 16, pieces: [96, 95.808], count: 7_500 }]);
    // Panels of 16 ft cut to the bays, two to a panel (192 in, 191.616 in; no kerf on wire).
    expect(t.materials.find((m: { sku: string }) => m.sku === 'WW-PANEL-16').takeoffQty).toBe(7_500);
  });

  it('answers an inline recipe at its limits: posts every 2 ft, eight rails a bay', async () => {
    const wire = DEFAULT_RECIPES.wire_panel;
    const recipe = { ...wire, heightMinIn: 12, heightMaxIn: 144, spacingFt: 2, minBayFt: 0.5, rails: { ...wire.rails!, byHeight: [{ maxHeightIn: 144, count: 8 }] } };
    const r = await withHealth(co.estimator.post('/api/takeoff', { recipe, rates: DEFAULT_RATES.wire_panel, runs, gates }), 'the largest inline-recipe takeoff');
    expect(r.status, r.text.slice(0, 500)).toBe(200);
    const t = r.body.takeoff;
    // 2 ft bays of 24 in: 1,000 on a free run, 998 on a gated one.
    const bays = 30 * 1000 + 30 * 998;
    expect(t.bays).toBe(bays);
    expect(t.posts.total).toBe(30 * 1001 + 30 * 1000);
    expect(pieceCount(t.cutList, 'posts')).toBe(t.posts.total);
    // 479,520 rails of 24 in: n fit a 16 ft board when 24n + ⅛(n − 1) ≤ 192, so 7 (168.75 in),
    // and 6 need more than 12 ft (144.625 in). ⌈479,520 ÷ 7⌉ = 68,503 boards, the fewest possible.
    expect(pieceCount(t.cutList, 'rails')).toBe(8 * bays);
    expect(cuts(t.cutList, 'rails')).toEqual([
      { stockFt: 16, pieces: Array(7).fill(24), count: 68_502 },
      { stockFt: 16, pieces: Array(6).fill(24), count: 1 },
    ]);
    // 59,940 cap boards of 24 in the same way: 8,562 boards of 7 and one of 6.
    expect(cuts(t.cutList, 'cap')).toEqual([
      { stockFt: 16, pieces: Array(7).fill(24), count: 8_562 },
      { stockFt: 16, pieces: Array(6).fill(24), count: 1 },
    ]);
    // Eight 24 in bays to a 16 ft panel: ⌈59,940 ÷ 8⌉ = 7,493.
    expect(t.materials.find((m: { sku: string }) => m.sku === 'WW-PANEL-16').takeoffQty).toBe(7_493);
  });
});
