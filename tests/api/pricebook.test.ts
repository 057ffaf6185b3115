import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { makeCompany, type TestCompany } from '../setup/factory';
import { closeTestDb } from '../setup/db';

let co: TestCompany;
let other: TestCompany;

beforeAll(async () => { [co, other] = await Promise.all([makeCompany(), makeCompany()]); });
afterAll(closeTestDb);

const item = (sku: string, extra: Record<string, unknown> = {}) => ({ sku, name: `Item ${sku}`, category: 'material', unit: 'each', unitCostCents: 1234, supplierName: 'Test Yard', lastSeenOn: '2026-11-02', ...extra });

describe('price book items', () => {
  it.each([['owner', 201], ['estimator', 201], ['bookkeeper', 403], ['crew_lead', 403]] as const)('%s adding an item gets %i', async (role, status) => {
    expect((await co.as(role).post('/api/pricebook', item(`ADD-${role}`))).status).toBe(status);
  });

  it('a bookkeeper reads the price book; a crew lead never sees its costs', async () => {
    expect((await co.bookkeeper.get('/api/pricebook')).status).toBe(200);
    for (const path of ['/api/pricebook', '/api/pricebook/export', '/api/pricebook/changes', '/pricebook']) expect((await co.crew_lead.get(path)).status, path).toBe(403);
  });

  it('edits, searches, sorts and keeps items of other companies out', async () => {
    const a = (await co.estimator.post('/api/pricebook', item('SRT-B', { unitCostCents: 500 }))).body;
    await co.estimator.post('/api/pricebook', item('SRT-A', { unitCostCents: 900, name: 'Galvanized hinge' }));
    const found = await co.estimator.get('/api/pricebook?q=hinge');
    expect(found.body.items.map((i: { sku: string }) => i.sku)).toEqual(['SRT-A']);
    const byCost = await co.estimator.get('/api/pricebook?q=SRT&sort=unitCost&dir=desc');
    expect(byCost.body.items.map((i: { sku: string }) => i.sku)).toEqual(['SRT-A', 'SRT-B']);
    const edited = await co.estimator.patch(`/api/pricebook/${a.id}`, { unitCostCents: 650 });
    expect(edited.body.unitCostCents).toBe(650);
    expect((await other.owner.get(`/api/pricebook/${a.id}`)).status).toBe(404);
    expect((await other.owner.patch(`/api/pricebook/${a.id}`, { unitCostCents: 1 })).status).toBe(404);
    const dup = await co.estimator.post('/api/pricebook', item('SRT-A'));
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields.sku).toBeTruthy();
    const bad = await co.estimator.post('/api/pricebook', { ...item('X'), unitCostCents: -5, unit: '', category: 'snacks' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['category', 'unit', 'unitCostCents']);
  });

  it("shows the estimator what someone else changed, until they mark it seen", async () => {
    const a = (await co.owner.post('/api/pricebook', item('CHG-1', { unitCostCents: 1000 }))).body;
    await co.owner.patch(`/api/pricebook/${a.id}`, { unitCostCents: 1100 });
    const ch = await co.estimator.get('/api/pricebook/changes');
    const mine = ch.body.items.filter((c: { sku: string }) => c.sku === 'CHG-1');
    expect(mine.map((c: { oldUnitCostCents: number | null; newUnitCostCents: number }) => [c.oldUnitCostCents, c.newUnitCostCents])).toEqual([[1000, 1100], [null, 1000]]);
    expect((await co.estimator.post('/api/pricebook/changes', { ids: 'all' })).status).toBe(200);
    expect((await co.estimator.get('/api/pricebook/changes')).body.items).toEqual([]);
    // The estimator's own edit is not news to the estimator.
    await co.estimator.patch(`/api/pricebook/${a.id}`, { unitCostCents: 1200 });
    expect((await co.estimator.get('/api/pricebook/changes')).body.items).toEqual([]);
  });
});

describe('CSV import and export', () => {
  const csv = (rows: string[][]) => Papa.unparse([['sku', 'name', 'category', 'unit', 'unit_cost', 'supplier', 'last_seen_on', 'active', 'notes'], ...rows]);

  it('imports new and changed rows by sku, previews without saving, and is a no-op the second time', async () => {
    const file = csv([
      ['CSV-1', 'Post, 4×4 "premium"', 'material', 'each', '$15.49', 'Yard A', '2026-10-01', 'yes', 'line one\nline two'],
      ['CSV-2', 'Auger', 'rental', 'day', '165', 'Rental B', '', 'yes', ''],
    ]);
    const dry = await co.estimator.post('/api/pricebook/import', { csv: file, dryRun: true });
    expect(dry.body).toMatchObject({ rows: 2, created: 2, dryRun: true });
    expect((await co.estimator.get('/api/pricebook?q=CSV-')).body.total).toBe(0);
    const real = await co.estimator.post('/api/pricebook/import', { csv: file, fileName: 'yard.csv' });
    expect(real.body).toMatchObject({ created: 2, updated: 0, dryRun: false });
    const got = (await co.estimator.get('/api/pricebook?q=CSV-')).body.items;
    expect(got.find((i: { sku: string }) => i.sku === 'CSV-1')).toMatchObject({ name: 'Post, 4×4 "premium"', unitCostCents: 1549, notes: 'line one\nline two', supplierName: 'Yard A' });
    expect(got.find((i: { sku: string }) => i.sku === 'CSV-2')).toMatchObject({ unitCostCents: 16500, category: 'rental', lastSeenOn: null });
    expect((await co.estimator.post('/api/pricebook/import', { csv: file })).body).toMatchObject({ created: 0, updated: 0, unchanged: 2 });
    const changed = csv([['CSV-2', 'Auger', 'rental', 'day', '170.00', 'Rental B', '2026-11-01', 'yes', '']]);
    expect((await co.estimator.post('/api/pricebook/import', { csv: changed })).body).toMatchObject({ updated: 1, priceChanges: 1 });
  });

  it('refuses a file with bad rows as a whole, naming the line and column', async () => {
    const file = csv([['OK-1', 'Fine', 'material', 'each', '1.00', '', '', 'yes', ''], ['BAD-1', 'Bad cost', 'material', 'each', 'twelve', '', '', 'yes', ''], ['BAD-2', '', 'material', 'each', '1.005', '', '2026-02-30', 'yes', '']]);
    const r = await co.estimator.post('/api/pricebook/import', { csv: file });
    expect(r.status).toBe(400);
    expect(r.body.error.fields['rows.3.unit_cost']).toMatch(/Line 3/);
    expect(r.body.error.fields['rows.4.unit_cost']).toMatch(/Line 4/);
    expect((await co.estimator.get('/api/pricebook?q=OK-1')).body.total).toBe(0);
    const noCols = await co.estimator.post('/api/pricebook/import', { csv: 'a,b\n1,2' });
    expect(noCols.status).toBe(400);
    expect(noCols.body.error.fields.csv).toMatch(/sku/);
  });

  it('exports CSV that reads back the same, with formula cells neutralised (OWASP, "CSV Injection")', async () => {
    await co.estimator.post('/api/pricebook', item('EXP-1', { name: '=HYPERLINK("http://x.example","click")', unitCostCents: 999 }));
    const r = await co.bookkeeper.get('/api/pricebook/export');
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toContain('text/csv');
    const rows = Papa.parse<Record<string, string>>(r.text, { header: true }).data;
    const row = rows.find((x) => x.sku === 'EXP-1')!;
    expect(row.name.startsWith("'=")).toBe(true);
    expect(row.unit_cost).toBe('9.99');
  });
});
