import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { stack } from '../setup/stack';
import { ok, upload } from './receipts-helpers';

// The sample files a newcomer tries: one per demo supplier, each in its own layout, each with
// one row to fix and lines that match no job. Here they go into a fresh company that has the
// demo's job codes, with the mapping guessed from the headers alone.
const FIXTURES = [
  { file: 'cedar-hollow-lumber.csv', supplier: 'Cedar Hollow Lumber', delimiter: ',', badRow: 6, fix: (c: string[]) => c.map((x) => (x === '11/31/2026' ? '11/30/2026' : x)) },
  { file: 'ironbridge-fence-supply.csv', supplier: 'Ironbridge Fence Supply', delimiter: ',', badRow: 4, fix: (c: string[]) => c.map((x) => (x === 'four EA' ? '4 EA' : x)) },
  { file: 'kettle-rock-ready-mix.csv', supplier: 'Kettle Rock Ready-Mix & Gravel', delimiter: ';', badRow: 5, fix: (c: string[]) => c.map((x) => (x === '45,O0' ? '45,00' : x)) },
];

let co: TestCompany;
const jobs: Record<string, number> = {};

beforeAll(async () => {
  co = await makeCompany();
  const cust = await makeCustomer(co.owner);
  for (const code of ['J-0153', 'J-0154', 'J-0155', 'J-0157']) jobs[code] = (await makeJob(co.owner, cust.id, { code, status: 'building' })).id;
});
afterAll(closeTestDb);

describe('the sample receipt files', () => {
  for (const f of FIXTURES) {
    it(`${f.file}: guessed mapping, one flagged row fixed, committed, the rest allocated`, async () => {
      const content = readFileSync(path.join(stack().root, 'tests/fixtures/receipts', f.file));
      const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: f.file, content }, { supplier: f.supplier });
      expect(r.status, r.text).toBe(201);
      expect(r.body.mappingProblems).toEqual({});
      expect(r.body.delimiter).toBe(f.delimiter);
      expect(r.body.counts.errors).toBe(1);
      const bad = (await ok(co.bookkeeper.get(`/api/receipts/imports/${r.body.id}/lines?state=error`), 'errors')).items[0];
      expect(bad.rowNumber).toBe(f.badRow);
      const fixed = await co.bookkeeper.patch(`/api/receipts/imports/${r.body.id}/lines/${bad.id}`, { cells: f.fix(bad.raw) });
      expect(fixed.body.state, fixed.text).toBe('ok');
      const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, { allOrNothing: true }), 'commit');
      expect(c.summary.errorsLeftOut).toBe(0);
      const waiting = await ok(co.bookkeeper.get(`/api/receipts/lines?allocation=unmatched&importId=${r.body.id}`), 'unmatched');
      for (const line of waiting.items) {
        const res = line.sku?.startsWith('SHOP')
          ? await co.bookkeeper.post(`/api/receipts/lines/${line.id}/allocation`, { mode: 'overhead', category: 'other' })
          : await co.bookkeeper.post(`/api/receipts/lines/${line.id}/allocation`, { mode: 'job', jobId: jobs['J-0154'], category: 'material' });
        expect(res.status, res.text).toBe(200);
      }
      expect((await ok(co.bookkeeper.get(`/api/receipts/lines?allocation=unmatched&importId=${r.body.id}`), 'none left')).total).toBe(0);
      // Every cent of the file is now on a job or overhead, and the file again adds nothing.
      const [[sum]] = await testDb().raw('SELECT SUM(c.amount_cents) AS s FROM cost_lines c JOIN import_lines l ON l.id = c.import_line_id WHERE l.import_id = ? AND (c.job_id IS NOT NULL OR c.overhead = 1)', [r.body.id]);
      expect(Number(sum.s)).toBe(c.summary.addedCents);
      const again = await upload(co.bookkeeper, '/api/receipts/imports', { name: f.file, content });
      expect(again.body.duplicateOf?.id).toBe(r.body.id);
    });
  }

  it('puts each job’s materials in its costing, to the cent of the files', async () => {
    const costing = await ok(co.owner.get(`/api/jobs/${jobs['J-0157']}/costing`), 'costing');
    // Ironbridge 288.00 + 192.00, Kettle 314.40 + 62.40 + delivery 45.00
    expect(costing.categories.find((c: { category: string }) => c.category === 'material').actualCents).toBe(28800 + 19200 + 31440 + 6240 + 4500);
    const j153 = await ok(co.owner.get(`/api/jobs/${jobs['J-0153']}/costing`), 'costing');
    expect(j153.categories.find((c: { category: string }) => c.category === 'material').actualCents).toBe(-4200);
  });
});
