import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { costTotalsDrift } from '../setup/cost-totals';
import { stack } from '../setup/stack';
import { multipart, ok, upload } from './receipts-helpers';

let co: TestCompany;
let other: TestCompany;
let jobA: { id: number; code: string };
let jobB: { id: number; code: string };

const HEADER = 'Invoice Date,Invoice #,Line,SKU,Description,Qty,Unit Price,Ext,Tax,PO,Memo';
const goodFile = (a: string, b: string) => [
  HEADER,
  `3/2/2026,INV-5001,1,PT4410,"4x4x10 treated post, ground contact",12 EA,$14.20,$170.40,$12.57,${a},`,
  `3/2/2026,INV-5001,2,CB80,Concrete mix 80 lb,20,$6.45,,,${a},`,
  `3/4/2026,INV-5002,1,RL-2x4,2x4x8 rail,30,$4.10,$123.00,,,deliver ${b}`,
  '3/6/2026,INV-5003,1,SHOP,Marking paint,2,$7.50,$15.00,,,shop stock',
  `3/9/2026,INV-5004,1,CB80,Return concrete mix 80 lb,-4,$6.45,($25.80),,${a},`,
  ',,,,Invoice total,,,$461.22,,,',
].join('\r\n');

beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  const cust = await makeCustomer(co.owner);
  jobA = await makeJob(co.owner, cust.id, { code: 'J-0142', status: 'building' });
  jobB = await makeJob(co.owner, cust.id, { code: 'J-0150', status: 'building' });
});
afterAll(async () => {
  // Every write above went through the app: the reports' cost totals must still equal their sources.
  expect(await costTotalsDrift(co.id)).toEqual([]);
  await closeTestDb();
});

const costOf = async (jobId: number, category = 'material') => {
  const [[r]] = await testDb().raw('SELECT COALESCE(SUM(amount_cents), 0) AS s FROM cost_lines WHERE organization_id = ? AND job_id = ? AND category = ?', [co.id, jobId, category]);
  return Number(r.s);
};

describe('upload → preview → commit', () => {
  let importId: number;

  it('answers the preview with the guessed mapping, matches and row problems', async () => {
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'cedar-hollow-march.csv', content: goodFile('J-0142', 'PO 150') }, { supplier: 'Cedar Hollow Lumber' });
    expect(r.status, r.text).toBe(201);
    importId = r.body.id;
    expect(r.body).toMatchObject({ status: 'preview', kind: 'receipts', supplierName: 'Cedar Hollow Lumber', mappingSource: 'guessed', mappingProblems: {} });
    expect(r.body.mapping).toMatchObject({ dateFormat: 'mdy', decimal: '.', columns: { date: 'Invoice Date', receiptNumber: 'Invoice #', amount: 'Ext', jobRef: 'PO' } });
    expect(r.body.counts).toMatchObject({ rows: 6, lines: 5, errors: 0, skipped: 1, matched: 4, unmatched: 1 });
    // 170.40 + 12.57 + 129.00 + 123.00 + 15.00 − 25.80
    expect(r.body.counts.goodCents).toBe(42417);
    const lines = await ok(co.bookkeeper.get(`/api/receipts/imports/${importId}/lines`), 'lines');
    expect(lines.items.map((l: { rowNumber: number; state: string; matchedJobCode: string | null }) => [l.rowNumber, l.state, l.matchedJobCode])).toEqual([
      [2, 'ok', 'J-0142'], [3, 'ok', 'J-0142'], [4, 'ok', 'J-0150'], [5, 'ok', null], [6, 'ok', 'J-0142'], [7, 'skipped', null],
    ]);
    expect(lines.items[0].raw).toEqual(['3/2/2026', 'INV-5001', '1', 'PT4410', '4x4x10 treated post, ground contact', '12 EA', '$14.20', '$170.40', '$12.57', 'J-0142', '']);
    expect(lines.items[5].reason).toContain('total row');
    expect(await costOf(jobA.id)).toBe(0);
  });

  it('commits in one go: matched lines become job costs, returns reduce them, the file is kept', async () => {
    const r = await co.bookkeeper.post(`/api/receipts/imports/${importId}/commit`, {});
    expect(r.status, r.text).toBe(200);
    expect(r.body.summary).toMatchObject({ added: 5, duplicates: 0, addedCents: 42417, matched: 4, unmatched: 1 });
    expect(r.body.import.status).toBe('committed');
    expect(await costOf(jobA.id)).toBe(18297 + 12900 - 2580);
    expect(await costOf(jobB.id)).toBe(12300);
    const costing = await ok(co.owner.get(`/api/jobs/${jobA.id}/costing`), 'costing');
    expect(costing.categories.find((c: { category: string }) => c.category === 'material').actualCents).toBe(28617);
    const file = await co.bookkeeper.get(`/api/receipts/imports/${importId}/file`);
    expect(file.status).toBe(200);
    expect(file.headers['content-disposition']).toContain('attachment');
    expect(file.text).toBe(goodFile('J-0142', 'PO 150'));
    const [[imp]] = await testDb().raw('SELECT uploaded_by, file_bytes FROM imports WHERE id = ?', [importId]);
    expect(imp.uploaded_by).toBe(co.userIds.bookkeeper);
    expect(Number(imp.file_bytes)).toBe(Buffer.byteLength(goodFile('J-0142', 'PO 150')));
    const supplier = await testDb()('suppliers').where({ organization_id: co.id, name: 'Cedar Hollow Lumber' }).first();
    expect(supplier).toBeTruthy();
  });

  it('refuses a second commit of the same import', async () => {
    expect((await co.bookkeeper.post(`/api/receipts/imports/${importId}/commit`, {})).status).toBe(409);
  });

  it('adds nothing when the same file comes again, and says so', async () => {
    const again = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'copy.csv', content: goodFile('J-0142', 'PO 150') });
    expect(again.status).toBe(201);
    expect(again.body.duplicateOf.id).toBe(importId);
    expect(again.body.supplierName).toBe('Cedar Hollow Lumber');
    expect(again.body.mappingSource).toBe('saved');
    expect(again.body.counts.duplicates).toBe(5);
    const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${again.body.id}/commit`, {}), 'commit');
    expect(c.summary).toMatchObject({ added: 0 });
    expect(c.summary.message).toContain('already imported');
    expect(await costOf(jobA.id)).toBe(28617);
  });

  it('adds only the new lines when the same receipt lines arrive inside another file', async () => {
    const lines = goodFile('J-0142', 'PO 150').split('\r\n');
    const other = [lines[0], lines[3], `3/12/2026,INV-5010,1,CB80,Concrete mix 80 lb,10,$6.55,$65.50,,J-0142,`, lines[1]].join('\n');
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'statement.csv', content: other }, { supplier: 'Cedar Hollow Lumber' });
    expect(r.body.duplicateOf).toBeNull();
    expect(r.body.counts).toMatchObject({ lines: 1, duplicates: 2 });
    const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {}), 'commit');
    expect(c.summary).toMatchObject({ added: 1, duplicates: 2, addedCents: 6550 });
    expect(await costOf(jobA.id)).toBe(28617 + 6550);
  });
});

describe('bad rows', () => {
  const file = [
    'Date;Ticket;Item;Description;Qty;Amount;Job',
    '02.03.2026;T-1;G-57;Gravel 3/4 in;1,5 t;86,40;J-0142',
    '31.02.2026;T-2;G-57;Gravel;1 t;57,60;J-0142',
    '03.03.2026;T-3;NAIL;Nails;1 box;zwölf;J-0142',
    '',
    '04.03.2026;T-4;PNT;Paint;2;19,90;J-0150',
    '05.03.2026;T-5;;"Delivery; Saturday";;45,00;',
  ].join('\n');
  const mapping = JSON.stringify({ columns: { date: 'Date', receiptNumber: 'Ticket', sku: 'Item', description: 'Description', quantity: 'Qty', amount: 'Amount', jobRef: 'Job' }, dateFormat: 'dmy', decimal: ',' });

  it('reports each bad row with its number and reason, and commits the good ones', async () => {
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'kestrel.csv', content: file }, { supplier: 'Kestrel Aggregates', mapping });
    expect(r.status, r.text).toBe(201);
    expect(r.body.delimiter).toBe(';');
    expect(r.body.mappingSource).toBe('given');
    expect(r.body.counts).toMatchObject({ lines: 3, errors: 2, blank: 1 });
    expect(r.body.blankRows).toEqual([5]);
    // The upload's answer carries the rows with errors themselves, not only their count.
    expect(r.body.rowErrors).toEqual({ total: 2, rows: [
      { rowNumber: 3, reason: 'date: "31.02.2026" is not a day/month/year date' },
      { rowNumber: 4, reason: 'amount: "zwölf" is not an amount' },
    ] });
    const problems = await ok(co.bookkeeper.get(`/api/receipts/imports/${r.body.id}/lines?state=problems`), 'problems');
    expect(problems.items.map((l: { rowNumber: number; reason: string }) => [l.rowNumber, l.reason])).toEqual([
      [3, 'date: "31.02.2026" is not a day/month/year date'],
      [4, 'amount: "zwölf" is not an amount'],
    ]);
    const allOrNothing = await co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, { allOrNothing: true });
    expect(allOrNothing.status).toBe(422);
    expect(allOrNothing.body.error.message).toContain('row 3');
    const before = await costOf(jobA.id);
    const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {}), 'commit');
    expect(c.summary).toMatchObject({ added: 3, errorsLeftOut: 2, addedCents: 8640 + 1990 + 4500 });
    expect(await costOf(jobA.id)).toBe(before + 8640);
  });

  it('takes the rows fixed in a re-upload of a committed file, and only those', async () => {
    const first = await ok(co.bookkeeper.get('/api/receipts/imports'), 'list');
    const committed = first.find((i: { fileName: string; status: string }) => i.fileName === 'kestrel.csv' && i.status === 'committed');
    expect(committed).toBeTruthy();
    const before = await costOf(jobA.id);
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'kestrel-again.csv', content: file }, { supplier: 'Kestrel Aggregates', mapping });
    expect(r.status, r.text).toBe(201);
    expect(r.body.duplicateOf.id).toBe(committed.id);
    expect(r.body.counts).toMatchObject({ lines: 0, duplicates: 3, errors: 2 });
    const problems = await ok(co.bookkeeper.get(`/api/receipts/imports/${r.body.id}/lines?state=error`), 'problems');
    const bad = problems.items.find((l: { rowNumber: number }) => l.rowNumber === 3);
    await ok(co.bookkeeper.patch(`/api/receipts/imports/${r.body.id}/lines/${bad.id}`, { cells: ['28.02.2026', 'T-2', 'G-57', 'Gravel', '1 t', '57,60', 'J-0142'] }), 'fix');
    const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {}), 'commit');
    expect(c.summary).toMatchObject({ added: 1, duplicates: 3, errorsLeftOut: 1, addedCents: 5760 });
    expect(c.summary.message).toContain(`already imported as import #${committed.id}`);
    expect(await costOf(jobA.id)).toBe(before + 5760);
    // The same file a third time: everything in it is now in, so nothing more.
    const third = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'kestrel-3.csv', content: file }, { supplier: 'Kestrel Aggregates', mapping });
    const fix3 = (await ok(co.bookkeeper.get(`/api/receipts/imports/${third.body.id}/lines?state=error`), 'problems')).items.find((l: { rowNumber: number }) => l.rowNumber === 3);
    await ok(co.bookkeeper.patch(`/api/receipts/imports/${third.body.id}/lines/${fix3.id}`, { cells: ['28.02.2026', 'T-2', 'G-57', 'Gravel', '1 t', '57,60', 'J-0142'] }), 'fix');
    const c3 = await ok(co.bookkeeper.post(`/api/receipts/imports/${third.body.id}/commit`, {}), 'commit');
    expect(c3.summary).toMatchObject({ added: 0, duplicates: 4 });
    expect(await costOf(jobA.id)).toBe(before + 5760);
  });

  it('lets the bookkeeper fix a flagged row in the preview', async () => {
    const text = file.replace('T-1', 'T-11').replace('T-2', 'T-12').replace('T-3', 'T-13').replace('T-4', 'T-14').replace('T-5', 'T-15');
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'kestrel-2.csv', content: text }, { supplier: 'Kestrel Aggregates', mapping });
    const problems = await ok(co.bookkeeper.get(`/api/receipts/imports/${r.body.id}/lines?state=error`), 'problems');
    const bad = problems.items.find((l: { rowNumber: number }) => l.rowNumber === 3);
    const fixed = await co.bookkeeper.patch(`/api/receipts/imports/${r.body.id}/lines/${bad.id}`, { cells: ['28.02.2026', 'T-12', 'G-57', 'Gravel', '1 t', '57,60', 'J-0142'] });
    expect(fixed.status, fixed.text).toBe(200);
    expect(fixed.body).toMatchObject({ state: 'ok', date: '2026-02-28', amountCents: 5760, fixed: ['28.02.2026', 'T-12', 'G-57', 'Gravel', '1 t', '57,60', 'J-0142'] });
    expect(fixed.body.raw[0]).toBe('31.02.2026');
    const detail = await ok(co.bookkeeper.get(`/api/receipts/imports/${r.body.id}`), 'detail');
    expect(detail.counts).toMatchObject({ lines: 4, errors: 1 });
  });

  it('lists the first 100 rows with errors in the upload answer and counts them all', async () => {
    const rows = Array.from({ length: 150 }, (_, i) => `2026-03-${String((i % 28) + 1).padStart(2, '0')},E-${i},Bad ${i},lots`);
    const text = ['Date,Receipt,Description,Amount', '2026-03-01,E-OK,Good line,12.00', ...rows].join('\n');
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'many-bad.csv', content: text }, { supplier: 'Thistle Yard' });
    expect(r.status, r.text).toBe(201);
    expect(r.body.counts).toMatchObject({ lines: 1, errors: 150 });
    expect(r.body.rowErrors.total).toBe(150);
    expect(r.body.rowErrors.rows).toHaveLength(100);
    expect(r.body.rowErrors.rows[0]).toEqual({ rowNumber: 3, reason: 'amount: "lots" is not an amount' });
    expect(r.body.rowErrors.rows[99].rowNumber).toBe(102);
    const detail = await ok(co.bookkeeper.get(`/api/receipts/imports/${r.body.id}`), 'detail');
    expect(detail.rowErrors).toEqual(r.body.rowErrors);
    expect((await co.bookkeeper.delete(`/api/receipts/imports/${r.body.id}`)).status).toBe(204);
  });

  it('asks for the columns it needs instead of guessing wrong', async () => {
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'odd.csv', content: 'Belegdatum;Betrag\n02.03.2026;12,00\n' });
    expect(r.status).toBe(201);
    expect(Object.keys(r.body.mappingProblems)).toEqual(['columns.date', 'columns.amount']);
    expect((await co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {})).status).toBe(422);
    const remap = await co.bookkeeper.request('PUT', `/api/receipts/imports/${r.body.id}`, { json: { mapping: { columns: { date: 'Belegdatum', amount: 'Betrag' }, dateFormat: 'dmy', decimal: ',' } } });
    expect(remap.status, remap.text).toBe(200);
    expect(remap.body.mappingProblems).toEqual({});
    expect(remap.body.counts).toMatchObject({ lines: 1, unmatched: 1, goodCents: 1200 });
    expect((await co.bookkeeper.delete(`/api/receipts/imports/${r.body.id}`)).status).toBe(204);
    expect((await co.bookkeeper.get(`/api/receipts/imports/${r.body.id}`)).status).toBe(404);
  });

  it('refuses what is not a CSV file, an empty file, and a non-multipart body', async () => {
    const xlsx = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'book.xlsx', content: Buffer.from([0x50, 0x4b, 0x03, 0x04, 1, 2, 3]) });
    expect(xlsx.status).toBe(400);
    expect(xlsx.body.error.message).toContain('spreadsheet workbook');
    expect((await upload(co.bookkeeper, '/api/receipts/imports', { name: 'empty.csv', content: '' })).status).toBe(400);
    expect((await co.bookkeeper.post('/api/receipts/imports', { file: 'x' })).status).toBe(415);
    const badMapping = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'x.csv', content: 'a,b\n1,2\n' }, { mapping: '{"columns":{"colour":"a"}}' });
    expect(badMapping.status).toBe(400);
    expect(Object.keys(badMapping.body.error.fields)).toEqual(['mapping.columns.colour']);
  });
});

describe('size limits', () => {
  it('refuses a declared size over the limit with 413 before reading the body', async () => {
    const url = new URL('/api/receipts/imports', stack().appUrl);
    const status = await new Promise<number>((resolve, reject) => {
      const req = http.request({ hostname: url.hostname, port: url.port, path: url.pathname, method: 'POST', headers: {
        'content-type': 'multipart/form-data; boundary=x', 'content-length': String(200 * 1024 * 1024), origin: url.origin, cookie: co.bookkeeper.cookieHeader(), accept: 'application/json',
      } }, (res) => { res.resume(); resolve(res.statusCode ?? 0); });
      req.on('error', reject);
      req.write('--x\r\n');
    });
    expect(status).toBe(413);
  });

  it('cuts off a streamed body that grows past the limit and answers 413', async () => {
    const url = new URL('/api/receipts/imports', stack().appUrl);
    const max = Number(stack().appEnv.MAX_UPLOAD_BYTES ?? 25 * 1024 * 1024);
    const result = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = http.request({ hostname: url.hostname, port: url.port, path: url.pathname, method: 'POST', headers: {
        'content-type': 'multipart/form-data; boundary=x', 'transfer-encoding': 'chunked', origin: url.origin, cookie: co.bookkeeper.cookieHeader(), accept: 'application/json',
      } }, (res) => { let b = ''; res.on('data', (c) => (b += c)); res.on('end', () => resolve({ status: res.statusCode ?? 0, body: b })); });
      req.on('error', (e) => ((e as NodeJS.ErrnoException).code === 'EPIPE' || (e as NodeJS.ErrnoException).code === 'ECONNRESET' ? undefined : reject(e)));
      req.write('--x\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\nDate,Amount\r\n');
      const line = Buffer.from('2026-03-02,1.00\r\n'.repeat(4096));
      let sent = 0;
      const pump = () => {
        while (sent < max + 4 * 1024 * 1024) {
          sent += line.length;
          if (!req.write(line)) { req.once('drain', pump); return; }
        }
        req.end('\r\n--x--\r\n');
      };
      pump();
    });
    expect(result.status).toBe(413);
    expect(JSON.parse(result.body).error.code).toBe('PAYLOAD_TOO_LARGE');
    const [[{ n }]] = await testDb().raw("SELECT COUNT(*) AS n FROM imports WHERE organization_id = ? AND file_name = 'big.csv'", [co.id]);
    expect(Number(n)).toBe(0);
  });
});

describe('price book feedback', () => {
  it('updates the item’s unit cost, supplier and last-seen date, and records the change for the estimator', async () => {
    const [itemId] = await testDb()('price_book_items').insert({ organization_id: co.id, sku: 'PB-4410', name: '4x4x10 treated post', category: 'material', unit: 'each', unit_cost_cents: 1300, last_seen_on: '2026-01-15' });
    const text = ['Date,Receipt,Line,SKU,Description,Qty,Unit Price,Amount,Job', '2026-03-20,R-900,1,pb 4410,4x4x10 post,8,15.10,120.80,J-0142', '2026-01-02,R-800,1,PB-4410,4x4x10 post (old receipt),2,11.00,22.00,J-0142'].join('\n');
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'pb.csv', content: text }, { supplier: 'Millbrook Fence Supply' });
    const c = await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {}), 'commit');
    expect(c.summary.priceBookUpdates).toBe(1);
    const item = await testDb()('price_book_items').where({ id: itemId }).first();
    const supplier = await testDb()('suppliers').where({ organization_id: co.id, name: 'Millbrook Fence Supply' }).first();
    expect(Number(item.unit_cost_cents)).toBe(1510);
    expect(Number(item.supplier_id)).toBe(Number(supplier.id));
    expect(item.last_seen_on).toBe('2026-03-20');
    const changes = await testDb()('price_book_changes').where({ organization_id: co.id, item_id: itemId });
    expect(changes).toHaveLength(1);
    const line = await testDb()('import_lines').where({ import_id: r.body.id, row_number: 2 }).first();
    expect(changes[0]).toMatchObject({ source: 'receipt', source_ref: `import:${r.body.id}/line:${line.id}`, seen_by_estimator: 0 });
    expect(Number(changes[0].old_unit_cost_cents)).toBe(1300);
    expect(Number(changes[0].new_unit_cost_cents)).toBe(1510);
  });
});

describe('allocating what did not match', () => {
  let lineId: number;
  beforeAll(async () => {
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'yard.csv', content: 'Date,Receipt,Description,Amount\n2026-03-21,Y-1,Post hole digger bits,100.00\n2026-03-21,Y-2,=HYPERLINK("http://x"),10.00\n' }, { supplier: 'Wrenfield Yard' });
    await ok(co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {}), 'commit');
    const lines = await ok(co.bookkeeper.get(`/api/receipts/lines?allocation=unmatched&importId=${r.body.id}`), 'unmatched');
    expect(lines.total).toBe(2);
    lineId = lines.items.find((l: { description: string }) => l.description === 'Post hole digger bits').id;
  });

  it('allocates a line to a job and category, and the job’s actual cost moves by it', async () => {
    const before = await ok(co.owner.get(`/api/jobs/${jobB.id}/costing`), 'costing');
    const r = await co.bookkeeper.post(`/api/receipts/lines/${lineId}/allocation`, { mode: 'job', jobId: jobB.id, category: 'other' });
    expect(r.status, r.text).toBe(200);
    expect(r.body).toMatchObject({ allocation: 'job', parts: [{ jobId: jobB.id, jobCode: 'J-0150', category: 'other', amountCents: 10000 }] });
    const after = await ok(co.owner.get(`/api/jobs/${jobB.id}/costing`), 'costing');
    expect(after.totals.actualCents - before.totals.actualCents).toBe(10000);
  });

  it('splits a line by percent so the parts sum to the line exactly', async () => {
    const r = await co.bookkeeper.post(`/api/receipts/lines/${lineId}/split`, { by: 'percent', parts: [
      { jobId: jobA.id, category: 'material', percent: 33.3333 },
      { jobId: jobB.id, category: 'material', percent: 33.3333 },
      { jobId: null, category: 'other', percent: 33.3334 },
    ] });
    expect(r.status, r.text).toBe(200);
    expect(r.body.allocation).toBe('split');
    expect(r.body.parts.map((p: { amountCents: number }) => p.amountCents)).toEqual([3333, 3333, 3334]);
    expect(r.body.parts[2]).toMatchObject({ jobId: null, overhead: true });
    const [[{ s }]] = await testDb().raw('SELECT SUM(amount_cents) AS s FROM cost_lines WHERE import_line_id = ?', [lineId]);
    expect(Number(s)).toBe(10000);
  });

  it('refuses a split by amount that does not add up, and changes nothing', async () => {
    const r = await co.bookkeeper.post(`/api/receipts/lines/${lineId}/split`, { by: 'amount', parts: [{ jobId: jobA.id, category: 'material', amountCents: '60.00' }, { jobId: jobB.id, category: 'material', amountCents: '39.99' }] });
    expect(r.status).toBe(422);
    expect(r.body.error.message).toContain('add up to 99.99, the line is 100.00');
    const [[{ n }]] = await testDb().raw('SELECT COUNT(*) AS n FROM cost_lines WHERE import_line_id = ?', [lineId]);
    expect(Number(n)).toBe(3);
  });

  it('marks a line as overhead, and refuses another company’s job', async () => {
    const foreign = await makeJob(other.owner, (await makeCustomer(other.owner)).id);
    expect((await co.bookkeeper.post(`/api/receipts/lines/${lineId}/allocation`, { mode: 'job', jobId: foreign.id, category: 'material' })).status).toBe(400);
    const r = await co.bookkeeper.post(`/api/receipts/lines/${lineId}/allocation`, { mode: 'overhead', category: 'other' });
    expect(r.body).toMatchObject({ allocation: 'overhead', parts: [{ jobId: null, overhead: true, amountCents: 10000 }] });
  });

  it('keeps a formula-looking cell as text and neutralises it in the export', async () => {
    const r = await co.bookkeeper.get('/api/costs/export?unmatched=1');
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toContain('text/csv');
    expect(r.text).toContain(`"'=HYPERLINK(""http://x"")"`);
    expect(r.text).not.toMatch(/(^|,)=HYPERLINK/m);
  });
});

describe('who may', () => {
  it('keeps crew leads and estimators out of receipts, and another company out of ours', async () => {
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'mine.csv', content: 'Date,Amount\n2026-03-01,5.00\n' });
    const id = r.body.id;
    for (const path of ['/api/receipts/imports', `/api/receipts/imports/${id}`, `/api/receipts/imports/${id}/lines`, `/api/receipts/lines`]) {
      expect((await co.crew_lead.get(path)).status, path).toBe(403);
    }
    expect((await upload(co.crew_lead, '/api/receipts/imports', { name: 'x.csv', content: 'a\n1\n' })).status).toBe(403);
    const m = multipart({}, { name: 'x.csv', content: 'Date,Amount\n2026-03-01,5.00\n' });
    expect((await co.bookkeeper.request('POST', '/api/receipts/imports', { body: m.body, headers: { 'content-type': m.type }, origin: null })).status).toBe(403);
    expect((await co.bookkeeper.request('POST', '/api/receipts/imports', { body: m.body, headers: { 'content-type': m.type }, origin: 'http://evil.example' })).status).toBe(403);
    expect((await upload(co.estimator, '/api/receipts/imports', { name: 'x.csv', content: 'a\n1\n' })).status).toBe(403);
    for (const path of [`/api/receipts/imports/${id}`, `/api/receipts/imports/${id}/lines`, `/api/receipts/imports/${id}/file`]) {
      expect((await other.bookkeeper.get(path)).status, path).toBe(404);
    }
    expect((await other.bookkeeper.post(`/api/receipts/imports/${id}/commit`, {})).status).toBe(404);
    expect((await other.bookkeeper.delete(`/api/receipts/imports/${id}`)).status).toBe(404);
    const list = await ok(other.bookkeeper.get('/api/receipts/imports'), 'list');
    expect(list.map((i: { id: number }) => i.id)).not.toContain(id);
  });
});
