import http from 'node:http';
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, makeCustomer, makeJob, type TestCompany } from '../../setup/factory';
import { closeTestDb, testDb } from '../../setup/db';
import { stack } from '../../setup/stack';
import { upload } from '../receipts-helpers';

let co: TestCompany;
let jobCode: string;
beforeAll(async () => {
  co = await makeCompany();
  jobCode = (await makeJob(co.owner, (await makeCustomer(co.owner)).id, { status: 'building' })).code;
});
afterAll(closeTestDb);

const counts = async () => {
  const [[r]] = await testDb().raw('SELECT (SELECT COUNT(*) FROM imports WHERE organization_id = ?) AS i, (SELECT COUNT(*) FROM import_lines WHERE organization_id = ?) AS l, (SELECT COUNT(*) FROM cost_lines WHERE organization_id = ?) AS c', [co.id, co.id, co.id]);
  return { imports: Number(r.i), lines: Number(r.l), costs: Number(r.c) };
};

/** Streams a multipart upload of `size` bytes without holding it in memory, and returns the status. */
function streamUpload(size: number, chunk: Buffer): Promise<{ status: number; sent: number; body: string }> {
  const url = new URL('/api/receipts/imports', stack().appUrl);
  const boundary = `----hostile${randomBytes(6).toString('hex')}`;
  const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.csv"\r\nContent-Type: text/csv\r\n\r\n`);
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
  return new Promise((resolve, reject) => {
    let sent = 0;
    const req = http.request({ hostname: url.hostname, port: url.port, path: url.pathname, method: 'POST', headers: { cookie: co.bookkeeper.cookieHeader(), origin: url.origin, 'content-type': `multipart/form-data; boundary=${boundary}`, 'transfer-encoding': 'chunked' } }, (res) => {
      let body = '';
      res.on('data', (d) => { body += d; });
      res.on('end', () => resolve({ status: res.statusCode ?? 0, sent, body }));
    });
    req.on('error', (e) => (sent > 0 ? resolve({ status: 413, sent, body: String(e) }) : reject(e)));
    req.write(head);
    const pump = () => {
      while (sent < size) {
        sent += chunk.length;
        if (!req.write(chunk)) return void req.once('drain', pump);
      }
      req.end(tail);
    };
    pump();
  });
}

describe('hostile uploads', () => {
  it('refuses a 200 MB file with 413 before reading it whole, and keeps nothing', async () => {
    const before = await counts();
    const line = Buffer.from(`3/2/2026,R-1,1,SKU,Post,1,$1.00,$1.00,${'J-0001'}\n`.repeat(20_000));
    const r = await streamUpload(200 * 1024 * 1024, line);
    expect(r.status).toBe(413);
    expect(r.sent).toBeLessThan(200 * 1024 * 1024);
    expect(await counts()).toEqual(before);
  });

  it('refuses a file of one 10 MB line with a clear reason and keeps nothing half-written', async () => {
    const before = await counts();
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'one-line.csv', content: `Date,Amount,PO\n2026-03-02,${'9'.repeat(10 * 1024 * 1024)},${jobCode}` }, { supplier: 'Hostile Yard' });
    expect([400, 413, 422]).toContain(r.status);
    expect(r.body.error.message.length).toBeGreaterThan(10);
    const after = await counts();
    expect(after.costs).toBe(before.costs);
    expect(after.lines).toBe(before.lines);
  });

  it.each([
    ['binary data', randomBytes(4096)],
    ['a zip renamed .csv', Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), randomBytes(2048)])],
  ])('refuses %s', async (_what, content) => {
    const before = await counts();
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'data.csv', content }, { supplier: 'Hostile Yard' });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.file).toBeTruthy();
    expect((await counts()).costs).toBe(before.costs);
  });

  it('imports invalid UTF-8 safely as text', async () => {
    const content = Buffer.concat([Buffer.from('Date,Description,Amount,PO\r\n2026-03-02,Caf'), Buffer.from([0xe9, 0xff]), Buffer.from(` bracket,$12.00,${jobCode}\r\n`)]);
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'latin.csv', content }, { supplier: 'Hostile Yard' });
    expect(r.status, r.text).toBe(201);
    const c = await co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {});
    expect(c.status).toBe(200);
    const [[row]] = await testDb().raw('SELECT description FROM cost_lines WHERE organization_id = ? ORDER BY id DESC LIMIT 1', [co.id]);
    expect(row.description).toMatch(/^Caf.+ bracket$/);
  });

  it('stores formula cells as text and neutralises them in the CSV export', async () => {
    const evil = ['=HYPERLINK("http://evil.example","x")', '+SUM(A1:A9)', '-2+3', '@cmd'];
    const csv = ['Date,Description,Amount,PO', ...evil.map((e, i) => `2026-03-0${i + 1},"${e.replace(/"/g, '""')}",$1.00,${jobCode}`)].join('\n');
    const r = await upload(co.bookkeeper, '/api/receipts/imports', { name: 'formulas.csv', content: csv }, { supplier: 'Formula Yard' });
    expect(r.status, r.text).toBe(201);
    expect((await co.bookkeeper.post(`/api/receipts/imports/${r.body.id}/commit`, {})).status).toBe(200);
    const stored = (await testDb()('cost_lines').where('organization_id', co.id).whereIn('description', evil).pluck('description')) as string[];
    expect(stored.sort()).toEqual([...evil].sort());
    const exp = await co.bookkeeper.get('/api/costs/export');
    expect(exp.status).toBe(200);
    for (const e of evil) {
      expect(exp.text).not.toMatch(new RegExp(`(^|,)"?${e.replace(/[.*+?^${}()|[\]\\]/g, '\\$&').replace(/"/g, '""')}`, 'm'));
    }
    expect(exp.text).toContain("'=HYPERLINK");
  });
});
