import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { defaultPriceBookCsv, importPriceBook, styleId, twoRunsAndAGate } from '../setup/bids';
import { computeBid, bidInput } from '../../src/lib/bids/schema';
import { COST_CATEGORIES } from '../../src/lib/costs/categories';

let co: TestCompany;
let other: TestCompany;
let customerId: number;
let wood: number;

beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  customerId = (await makeCustomer(co.owner)).id;
  await importPriceBook(co.estimator);
  wood = await styleId(co.estimator);
});
afterAll(closeTestDb);

describe('POST /api/takeoff', () => {
  it('answers every quantity with its unit for a saved style, and nothing is saved', async () => {
    const before = await testDb()('bids').where('organization_id', co.id).count({ n: '*' });
    const r = await co.estimator.post('/api/takeoff', { styleId: wood, runs: [{ lengthFt: 40, heightIn: 72 }, { lengthFt: 30, heightIn: 72, connectsToPrevious: true }], gates: [{ runIndex: 1, widthFt: 4 }] });
    expect(r.status).toBe(200);
    expect(r.body.takeoff.posts).toEqual({ end: 2, corner: 1, line: 6, gate: 2, total: 11 });
    const q = Object.fromEntries(r.body.takeoff.quantities.map((x: { key: string; value: number; unit: string }) => [x.key, x]));
    expect(q.fence_length).toMatchObject({ value: 66, unit: 'ft' });
    expect(q.concrete_bags.unit).toBe('bags');
    expect(q.concrete_volume.unit).toBe('ft³');
    expect(r.body.takeoff.materials.every((m: { unit: string }) => m.unit)).toBe(true);
    expect(await testDb()('bids').where('organization_id', co.id).count({ n: '*' })).toEqual(before);
  });

  it('takes a whole recipe inline, so a style can be tried before it is saved', async () => {
    const style = (await co.estimator.get(`/api/styles/${wood}`)).body;
    const recipe = { ...style.recipe, spacingFt: 6 };
    const rates = (await co.estimator.get(`/api/rates/${wood}`)).body.current.values;
    const r = await co.bookkeeper.post('/api/takeoff', { recipe, rates, runs: [{ lengthFt: 36, heightIn: 72 }] });
    expect(r.status).toBe(200);
    expect(r.body.takeoff.bays).toBe(6);
    expect(r.body.style).toBeNull();
    expect(r.body.rates).toEqual(rates);
    // Every answer carries the caution, for a reader of the numbers alone.
    expect(r.body.notice).toMatch(/not an engineering approval/);
    // An inline recipe has no labour rates of its own: a clear field error, not another style's rates.
    const noRates = await co.bookkeeper.post('/api/takeoff', { recipe, runs: [{ lengthFt: 36, heightIn: 72 }] });
    expect(noRates.status).toBe(400);
    expect(noRates.body.error.fields.rates).toMatch(/labour rates/);
  });

  it('answers field errors for bad geometry, never a 500 or NaN', async () => {
    const cases: [unknown, string][] = [
      [{ styleId: wood, runs: [{ lengthFt: 0, heightIn: 72 }] }, 'runs.0.lengthFt'],
      [{ styleId: wood, runs: [{ lengthFt: -3, heightIn: 72 }] }, 'runs.0.lengthFt'],
      [{ styleId: wood, runs: [{ lengthFt: 3, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4 }] }, 'gates.0.widthFt'],
      [{ styleId: wood, runs: [{ lengthFt: 30, heightIn: 130 }] }, 'runs.0.heightIn'],
      [{ styleId: wood, runs: [{ lengthFt: 'far', heightIn: 72 }] }, 'runs.0.lengthFt'],
      [{ runs: [{ lengthFt: 30, heightIn: 72 }] }, 'styleId'],
      [{ styleId: 99999999, runs: [{ lengthFt: 30, heightIn: 72 }] }, 'styleId'],
    ];
    for (const [body, field] of cases) {
      const r = await co.estimator.post('/api/takeoff', body);
      expect(r.status, JSON.stringify(body)).toBe(400);
      expect(r.body.error.fields[field], JSON.stringify(r.body.error)).toBeTruthy();
      expect(r.text).not.toMatch(/NaN/);
    }
    expect((await co.estimator.post('/api/takeoff', { styleId: wood, runs: [{ lengthFt: 30, heightIn: 72 }], colour: 'red' })).status).toBe(400);
  });

  it('is closed to a crew lead, before the body is read', async () => {
    expect((await co.crew_lead.request('POST', '/api/takeoff', { body: '{nope', headers: { 'content-type': 'application/json' } })).status).toBe(403);
  });
});

describe('bids on a job', () => {
  it('saves numbered versions priced on the server exactly as the builder prices them', async () => {
    const job = await makeJob(co.estimator, customerId, { fenceStyleId: wood });
    const v1 = await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood));
    expect(v1.status).toBe(201);
    expect(v1.body.versionNo).toBe(1);
    expect(v1.body.status).toBe('draft');
    const v2 = await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood, { target: { mode: 'markup', pct: 45 } }));
    expect(v2.body.versionNo).toBe(2);

    // The same pure computation in the test, from what the API says the company has.
    const style = (await co.estimator.get(`/api/styles/${wood}`)).body;
    const rates = (await co.estimator.get(`/api/rates/${wood}`)).body.current.values;
    const settings = (await co.owner.get('/api/settings')).body;
    const items = (await co.estimator.get('/api/pricebook?pageSize=500')).body.items;
    const book = new Map(items.map((it: any) => [it.sku, { itemId: it.id, sku: it.sku, name: it.name, unit: it.unit, category: it.category, unitCostCents: it.unitCostCents, supplierName: it.supplierName, lastSeenOn: it.lastSeenOn }]));
    const local = computeBid(bidInput.parse(twoRunsAndAGate(wood)), style.recipe, rates,
      { frostDepthIn: settings.frostDepthIn, permitMaxHeightIn: { front: settings.permitMaxFrontIn, side: settings.permitMaxSideIn, back: settings.permitMaxBackIn } },
      book as never, { labourBurdenPct: settings.labourBurdenPct, taxMode: settings.taxMode, taxRatePct: settings.taxRatePct, bidRoundingCents: settings.bidRoundingCents });
    if ('ok' in local) throw new Error('local bid failed');
    expect(v1.body.priceCents).toBe(local.pricing.priceCents);
    expect(v1.body.costCents).toBe(local.pricing.costCents);
    expect(v1.body.costByCategory).toEqual(local.pricing.costByCategory);
    expect(v1.body.costByCategory.permit).toBe(7500);

    const list = await co.bookkeeper.get(`/api/jobs/${job.id}/bids`);
    expect(list.body.items.map((b: { versionNo: number }) => b.versionNo)).toEqual([2, 1]);
    expect((await co.crew_lead.get(`/api/jobs/${job.id}/bids`)).status).toBe(403);
    expect((await co.bookkeeper.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))).status).toBe(403);
  });

  it('stores the takeoff in queryable form with the rates and recipe it was priced with', async () => {
    const job = await makeJob(co.estimator, customerId);
    const b = (await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))).body;
    const row = await testDb()('bids').where({ id: b.id, organization_id: co.id }).first();
    expect(Number(row.fence_ft)).toBe(66);
    expect([row.post_count, row.hole_count, row.gate_count, row.corner_posts, row.gate_posts]).toEqual([11, 11, 1, 1, 2]);
    expect(Number(row.labour_hours)).toBeGreaterThan(0);
    expect(Number(row.rental_days)).toBe(0.5);
    const lines = await testDb()('bid_lines').where({ bid_id: b.id, kind: 'material' });
    const post = lines.find((l) => l.sku === 'PT-4X4-10');
    expect(Number(post.takeoff_qty)).toBe(11);
    expect(Number(post.buy_qty)).toBeGreaterThanOrEqual(11);
    const labour = await testDb()('bid_labour').where({ bid_id: b.id });
    expect(labour.map((l) => l.task).sort()).toEqual(['gates', 'posts', 'rails_infill', 'setup']);
    const rates = await testDb()('bid_rate_snapshots').where({ bid_id: b.id });
    expect(rates.length).toBe(8);
    expect(rates.every((x) => x.rate_version_id !== null)).toBe(true);
    const cats = await testDb()('bid_cost_categories').where({ bid_id: b.id });
    expect(cats.map((c) => c.category).sort()).toEqual([...COST_CATEGORIES].sort());
    expect((typeof row.recipe === 'string' ? JSON.parse(row.recipe) : row.recipe).spacingFt).toBe(8);
  });

  it('accepting fixes the contract and the estimate by category, and leaves change orders alone', async () => {
    const job = await makeJob(co.estimator, customerId, { status: 'bid_sent' });
    await testDb()('job_estimates').insert({ organization_id: co.id, job_id: job.id, category: 'material', amount_cents: 12345, source: 'change_order', source_id: 77 });
    const v1 = (await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))).body;
    const acc = await co.estimator.post(`/api/jobs/${job.id}/bids/${v1.id}/accept`, {});
    expect(acc.status).toBe(200);
    expect(acc.body.status).toBe('accepted');
    const j = (await co.owner.get(`/api/jobs/${job.id}`)).body;
    expect(j.contractCents).toBe(v1.priceCents);
    expect(j.status).toBe('won');
    const est = await testDb()('job_estimates').where({ organization_id: co.id, job_id: job.id });
    const bidRows = est.filter((e) => e.source === 'bid');
    expect(bidRows.map((e) => e.category).sort()).toEqual([...COST_CATEGORIES].sort());
    expect(bidRows.every((e) => Number(e.source_id) === v1.id)).toBe(true);
    expect(bidRows.reduce((a, e) => a + Number(e.amount_cents), 0)).toBe(v1.costCents);
    expect(est.filter((e) => e.source === 'change_order').map((e) => Number(e.amount_cents))).toEqual([12345]);

    const v2 = (await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood, { target: { mode: 'margin', pct: 40 } }))).body;
    await co.owner.post(`/api/jobs/${job.id}/bids/${v2.id}/accept`, {});
    expect((await co.owner.get(`/api/jobs/${job.id}/bids/${v1.id}`)).body.status).toBe('superseded');
    const est2 = await testDb()('job_estimates').where({ organization_id: co.id, job_id: job.id, source: 'bid' });
    expect(new Set(est2.map((e) => Number(e.source_id)))).toEqual(new Set([v2.id]));
    expect(est2).toHaveLength(7);
    expect((await co.owner.get(`/api/jobs/${job.id}`)).body.contractCents).toBe(v2.priceCents);
    expect((await co.crew_lead.get('/api/jobs?pageSize=200')).body.items.every((x: { contractCents: unknown }) => x.contractCents === null)).toBe(true);
    expect((await co.estimator.delete(`/api/jobs/${job.id}/bids/${v2.id}`)).status).toBe(422);
  });

  it('warns of a missing price and refuses to accept until every line is priced', async () => {
    const c = await makeCompany();
    await importPriceBook(c.estimator, defaultPriceBookCsv(['PT-4X4-10']));
    const s = await styleId(c.estimator);
    const cust = await makeCustomer(c.owner);
    const job = await makeJob(c.estimator, cust.id);
    const b = await c.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(s));
    expect(b.status).toBe(201);
    expect(b.body.warnings).toContain('No price for 4×4 treated post 10 ft (PT-4X4-10) in the price book.');
    expect(b.body.unpricedLines).toBe(1);
    const acc = await c.estimator.post(`/api/jobs/${job.id}/bids/${b.body.id}/accept`, {});
    expect(acc.status).toBe(422);
    expect(acc.body.error.message).toMatch(/no price for/i);
    // An override with a unit cost prices the line by hand, marked.
    const o = await c.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(s, { overrides: [{ key: 'material:PT-4X4-10', unitCostCents: 1650, note: 'phoned the yard' }] }));
    const line = o.body.lines.find((l: { key: string }) => l.key === 'material:PT-4X4-10');
    expect(line).toMatchObject({ overridden: true, priced: true, unitCostCents: 1650, note: 'phoned the yard' });
    expect((await c.estimator.post(`/api/jobs/${job.id}/bids/${o.body.id}/accept`, {})).status).toBe(200);
  });

  it('prints a split-rail bid without concrete, worded from its recipe, and a wood bid set in concrete', async () => {
    const split = await styleId(co.estimator, 'split_rail');
    const job = await makeJob(co.estimator, customerId, { fenceStyleId: split });
    const b = await co.estimator.post(`/api/jobs/${job.id}/bids`, { styleId: split, runs: [{ lengthFt: 100, heightIn: 48 }], gates: [], target: { mode: 'margin', pct: 30 } });
    expect(b.status).toBe(201);
    const page = await co.bookkeeper.get(`/jobs/${job.id}/bids/${b.body.id}/print`);
    expect(page.status).toBe(200);
    const scope = /data-testid="print-scope"[^>]*>([^<]*)</.exec(page.text)?.[1] ?? '';
    expect(scope).toMatch(/posts \(Cedar split-rail post, 3-hole\) set in tamped earth, without concrete, on a 4 in gravel base/);
    expect(page.text).not.toMatch(/in concrete/);
    expect(page.text).toMatch(/not an engineering approval/);

    const wjob = await makeJob(co.estimator, customerId);
    const w = (await co.estimator.post(`/api/jobs/${wjob.id}/bids`, twoRunsAndAGate(wood))).body;
    const wpage = await co.estimator.get(`/jobs/${wjob.id}/bids/${w.id}/print`);
    expect(/data-testid="print-scope"[^>]*>([^<]*)</.exec(wpage.text)?.[1]).toMatch(/11 posts \(4×4 treated post\) set in concrete on a 4 in gravel base/);
  });

  it('gives concurrent saves of one job distinct version numbers', async () => {
    const job = await makeJob(co.estimator, customerId);
    const made = await Promise.all(Array.from({ length: 4 }, () => co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))));
    expect(made.every((r) => r.status === 201)).toBe(true);
    expect(made.map((r) => r.body.versionNo).sort()).toEqual([1, 2, 3, 4]);
  });

  it("keeps another company's job and style out", async () => {
    const job = await makeJob(co.estimator, customerId);
    const b = (await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))).body;
    expect((await other.owner.get(`/api/jobs/${job.id}/bids`)).status).toBe(404);
    expect((await other.owner.get(`/api/jobs/${job.id}/bids/${b.id}`)).status).toBe(404);
    expect((await other.owner.post(`/api/jobs/${job.id}/bids/${b.id}/accept`, {})).status).toBe(404);
    const otherStyle = await styleId(other.owner);
    const r = await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(otherStyle));
    expect(r.status).toBe(400);
    expect(r.body.error.fields.styleId).toBeTruthy();
    expect((await co.estimator.get(`/api/jobs/${job.id}/bids/abc`)).status).toBe(404);
  });
});

describe('labour rates are versioned', () => {
  it('writes a new version with who and why; old bids keep their rates, new bids use the new ones', async () => {
    const job = await makeJob(co.estimator, customerId);
    const before = (await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))).body;
    expect((await co.bookkeeper.post(`/api/rates/${wood}`, { values: { hole_hours: 0.3 }, reason: 'clay' })).status).toBe(403);
    expect((await co.estimator.post(`/api/rates/${wood}`, { values: { hole_hours: 0.3 } })).status).toBe(400);
    const r = await co.estimator.post(`/api/rates/${wood}`, { values: { hole_hours: 0.3 }, reason: 'Clay soil on the east side' });
    expect(r.status).toBe(201);
    expect(r.body.written).toBe(1);
    const hist = r.body.history.filter((h: { kind: string }) => h.kind === 'hole_hours');
    expect(hist.map((h: { versionNo: number }) => h.versionNo)).toEqual([2, 1]);
    expect(hist[0]).toMatchObject({ value: 0.3, reason: 'Clay soil on the east side', createdByName: 'Test estimator' });
    const after = (await co.estimator.post(`/api/jobs/${job.id}/bids`, twoRunsAndAGate(wood))).body;
    const rate = (b: { rates: { kind: string; value: number }[] }) => b.rates.find((x) => x.kind === 'hole_hours')!.value;
    expect(rate((await co.estimator.get(`/api/jobs/${job.id}/bids/${before.id}`)).body)).toBe(0.15);
    expect(rate(after)).toBe(0.3);
    expect(after.costByCategory.labour).toBeGreaterThan(before.costByCategory.labour);
  });

  it('numbers rate edits made at the same moment one after the other, none lost', async () => {
    const values = [0.11, 0.12, 0.13, 0.14, 0.15, 0.16];
    const res = await Promise.all(values.map((v) => co.estimator.post(`/api/rates/${wood}`, { values: { gate_hours: v }, reason: `Edit ${v}` })));
    for (const r of res) expect(r.status, r.text).toBe(201);
    const hist = (await co.estimator.get(`/api/rates/${wood}`)).body.history.filter((h: { kind: string }) => h.kind === 'gate_hours');
    const nos = hist.map((h: { versionNo: number }) => h.versionNo).sort((a: number, b: number) => a - b);
    expect(nos).toEqual(Array.from({ length: nos.length }, (_, i) => i + 1));
    expect(hist.filter((h: { reason: string }) => h.reason.startsWith('Edit ')).map((h: { value: number }) => h.value).sort()).toEqual(values);
  });
});

describe('before the dig', () => {
  it('holds a job out of building until a current locate ticket is on file, unless the owner overrides in writing', async () => {
    const job = await makeJob(co.owner, customerId, { status: 'won' });
    const blocked = await co.owner.patch(`/api/jobs/${job.id}`, { status: 'building' });
    expect(blocked.status).toBe(422);
    expect(blocked.body.error.code).toBe('LOCATE_REQUIRED');
    expect(blocked.body.error.fields.status).toBeTruthy();

    expect((await co.estimator.patch(`/api/jobs/${job.id}/checklist`, { locateTicketNumber: 'A-1' })).status).toBe(400);
    const old = await co.estimator.patch(`/api/jobs/${job.id}/checklist`, { locateTicketNumber: 'T-0001', locateCalledOn: '2020-03-02' });
    expect(old.status).toBe(200);
    expect(old.body.locate.status).toBe('expired');
    expect(old.body.locate.digFrom).toBe('2020-03-04');
    expect((await co.owner.patch(`/api/jobs/${job.id}`, { status: 'building' })).status).toBe(422);

    expect((await co.estimator.post(`/api/jobs/${job.id}/checklist-override`, { reason: 'The customer dug these holes themselves.' })).status).toBe(403);
    expect((await co.owner.post(`/api/jobs/${job.id}/checklist-override`, { reason: 'short' })).status).toBe(400);
    const ov = await co.owner.post(`/api/jobs/${job.id}/checklist-override`, { reason: 'Posts go into existing sleeves; no digging on this job.' });
    expect(ov.status).toBe(200);
    expect(ov.body.gate.ok).toBe(true);
    expect((await co.owner.patch(`/api/jobs/${job.id}`, { status: 'building' })).status).toBe(200);
  });

  it('lets a job build with a current ticket, and shows the crew the checklist without prices', async () => {
    const job = await makeJob(co.owner, customerId, { status: 'won', crewLeadUserId: co.userIds.crew_lead });
    const today = new Date().toISOString().slice(0, 10);
    const c = await co.estimator.patch(`/api/jobs/${job.id}/checklist`, { locateTicketNumber: 'T-0002', locateCalledOn: today, permitRequired: 'no', propertyLineConfirmed: true });
    expect(['waiting', 'ready']).toContain(c.body.locate.status);
    expect((await co.estimator.patch(`/api/jobs/${job.id}`, { status: 'building' })).status).toBe(200);
    const crew = await co.crew_lead.get(`/api/jobs/${job.id}/checklist`);
    expect(crew.status).toBe(200);
    expect(crew.body.locateTicketNumber).toBe('T-0002');
    expect((await co.crew_lead.patch(`/api/jobs/${job.id}/checklist`, { permitRequired: 'yes' })).status).toBe(403);
    expect((await other.owner.get(`/api/jobs/${job.id}/checklist`)).status).toBe(404);
  });
});

describe('demo data', () => {
  it('gives each demo job bids that match its stage, and every won job the estimate its accepted bid priced', async () => {
    const { DEMO } = await import('../../src/server/seed/demo');
    const { DEMO_SUPPLIERS } = await import('../../src/server/seed/bids');
    const k = testDb();
    const org = DEMO.orgId;
    const jobs = await k('jobs').where('organization_id', org).select('id', 'status', 'contract_cents');
    let won = 0;
    for (const j of jobs) {
      const bids = await k('bids').where({ organization_id: org, job_id: j.id }).orderBy('version_no');
      const statuses = bids.map((b) => b.status);
      if (['won', 'building', 'completed', 'closed'].includes(j.status)) {
        won++;
        const accepted = bids.filter((b) => b.status === 'accepted');
        expect(accepted, `job ${j.id}`).toHaveLength(1);
        expect(Number(j.contract_cents)).toBe(Number(accepted[0].price_cents));
        const est = await k('job_estimates').where({ organization_id: org, job_id: j.id, source: 'bid' });
        expect(est).toHaveLength(COST_CATEGORIES.length);
        expect(est.every((e) => Number(e.source_id) === Number(accepted[0].id))).toBe(true);
        expect(est.reduce((a, e) => a + Number(e.amount_cents), 0)).toBe(Number(accepted[0].cost_cents));
      } else if (j.status === 'lost') expect(statuses).toEqual(['declined']);
      else if (j.status === 'bid_sent') expect(statuses.length > 0 && statuses.every((s) => s === 'sent')).toBe(true);
      else expect(statuses.every((s) => s === 'draft')).toBe(true);
    }
    expect(won).toBeGreaterThan(10);
    const unpriced = await k('bid_lines').where({ organization_id: org, priced: false }).count({ n: '*' });
    expect(Number(unpriced[0].n)).toBe(0);
    expect(await k('suppliers').where('organization_id', org).pluck('name')).toEqual(expect.arrayContaining([...DEMO_SUPPLIERS]));
    const woodHistory = await k('labour_rate_versions as v').join('labour_rates as r', 'r.id', 'v.rate_id').join('fence_styles as s', 's.id', 'r.style_id')
      .where({ 's.organization_id': org, 's.kind': 'wood_privacy' }).max({ n: 'v.version_no' });
    expect(Number(woodHistory[0].n)).toBeGreaterThanOrEqual(2);
  });
});
