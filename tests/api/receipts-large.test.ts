import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { testDb, closeTestDb } from '../setup/db';
import { ok, upload } from './receipts-helpers';

let co: TestCompany;
let job: { id: number; code: string };

beforeAll(async () => {
  co = await makeCompany();
  job = await makeJob(co.owner, (await makeCustomer(co.owner)).id, { code: 'J-0777', status: 'building' });
});
afterAll(closeTestDb);

/** A year of a busy yard's statement lines: 100,000 rows, a little over 20 MB. */
function bigFile(rows: number): { text: string; cents: number } {
  const out = ['Invoice Date,Invoice #,Line,SKU,Description,Qty,UOM,Unit Price,Ext,PO,Memo'];
  let cents = 0;
  for (let i = 0; i < rows; i++) {
    const qty = (i % 40) + 1;
    const price = 100 + (i % 997);
    cents += qty * price;
    const d = `${(i % 12) + 1}/${(i % 28) + 1}/2026`;
    out.push(`${d},INV-${100000 + Math.floor(i / 20)},${(i % 20) + 1},SKU-${i % 5000},"Pressure-treated 2x6x12 #2 ground contact board, bundle lot ${i}",${qty},EA,$${(price / 100).toFixed(2)},"$${((qty * price) / 100).toLocaleString('en-US', { minimumFractionDigits: 2 })}",${i % 10 === 0 ? 'J-0777' : ''},Yard pickup at the north gate bay ${i % 7}; loaded by forklift, strapped and tagged for the crew`);
  }
  return { text: out.join('\r\n') + '\r\n', cents };
}

describe('a large file', () => {
  it('imports 100,000 lines and 20 MB without trouble', async () => {
    const { text, cents } = bigFile(100_000);
    expect(Buffer.byteLength(text)).toBeGreaterThan(20 * 1024 * 1024);
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'statement-2026.csv', content: text }, { supplier: 'Big Yard Statement' });
    expect(r.status, r.text.slice(0, 300)).toBe(201);
    expect(r.body.counts).toMatchObject({ lines: 100_000, errors: 0, matched: 10_000, unmatched: 90_000, goodCents: cents });
    const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {}), 'commit');
    expect(c.summary).toMatchObject({ added: 100_000, addedCents: cents });
    const [[row]] = await testDb().raw('SELECT COUNT(*) AS n, SUM(amount_cents) AS s FROM cost_lines WHERE organization_id = ?', [co.id]);
    expect(Number(row.n)).toBe(100_000);
    expect(Number(row.s)).toBe(cents);
    const [[onJob]] = await testDb().raw('SELECT SUM(amount_cents) AS s FROM cost_lines WHERE organization_id = ? AND job_id = ?', [co.id, job.id]);
    const costing = await ok(co.owner.get(`/api/jobs/${job.id}/costing`), 'costing');
    expect(costing.categories.find((c: { category: string }) => c.category === 'material').actualCents).toBe(Number(onJob.s));
    const file = await co.bookkeeper.get(`/api/receipts/imports/${r.body.id}/file`);
    expect(file.text.length).toBe(text.length);
  }, 600_000);
});
