import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client } from '../setup/client';
import { PASSWORD, makeCompany, makeCustomer, makeJob, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { startApp, type Proc } from '../setup/processes';
import { upload } from '../api/receipts-helpers';

let co: TestCompany;
let codes: string[];
const extra: Proc[] = [];
beforeAll(async () => {
  co = await makeCompany();
  codes = [];
  for (let i = 0; i < 5; i++) codes.push((await makeJob(co.owner, (await makeCustomer(co.owner)).id, { status: 'building' })).code);
});
afterAll(async () => {
  for (const p of extra) await p.kill('SIGKILL');
  await closeTestDb();
});

function bigReceipt(lines: number): string {
  const out = ['Date,Invoice #,Line,SKU,Description,Qty,Unit Price,Ext,PO'];
  for (let i = 0; i < lines; i++) out.push(`3/${1 + (i % 28)}/2026,CRASH-${Math.floor(i / 25)},${(i % 25) + 1},SKU-${i % 300},Item ${i},2,$3.00,$6.00,${codes[i % codes.length]}`);
  return out.join('\n');
}

const costLinesOf = async (importId: number) => {
  const [[r]] = await testDb().raw('SELECT COUNT(*) AS n FROM cost_lines c JOIN import_lines l ON l.id = c.import_line_id WHERE l.import_id = ? AND c.organization_id = ?', [importId, co.id]);
  return Number(r.n);
};

describe('an app killed in the middle of committing an import', () => {
  it('leaves the import whole or absent, never partial, and committing again works', async () => {
    const LINES = 25_000;
    const app = await startApp();
    extra.push(app);
    const c = new Client(app.url);
    expect((await c.signIn(co.emails.bookkeeper, PASSWORD)).status).toBe(200);
    const uploadOne = async (tag: string) => {
      const up = await upload(c, '/api/receipts/imports', { name: `${tag}.csv`, content: bigReceipt(LINES).replace(/CRASH-/g, `${tag}-`) }, { supplier: 'Crash Test Supply' });
      expect(up.status, up.text).toBe(201);
      return up.body.id as number;
    };
    // How long a commit of this size takes here, to aim the kill at its middle.
    const probe = await uploadOne('PROBE');
    const t0 = performance.now();
    expect((await c.post(`/api/receipts/imports/${probe}/commit`, {})).status).toBe(200);
    const commitMs = performance.now() - t0;

    const importId = await uploadOne('CRASH');
    const commit = c.post(`/api/receipts/imports/${importId}/commit`, {}).catch((e: Error) => ({ status: 0, text: e.message }));
    await new Promise((r) => setTimeout(r, commitMs * 0.5));
    await app.kill('SIGKILL');
    const answer = await commit;
    expect(answer.status, 'the commit answered before the kill; it was not cut off').not.toBe(200);

    // MariaDB rolls the open transaction back when the connection drops.
    // (It shows as ROLLING BACK for a moment; on a busy machine that can take a while.)
    await expect.poll(async () => {
      const [rows] = await testDb().raw('SELECT COUNT(*) AS n FROM information_schema.INNODB_TRX WHERE trx_rows_modified > 0');
      return Number(rows[0].n);
    }, { timeout: 120_000, interval: 250 }).toBe(0);
    const afterCrash = await costLinesOf(importId);
    expect([0, LINES]).toContain(afterCrash);
    const status = (await testDb()('imports').where({ id: importId, organization_id: co.id }).first('status')).status;
    expect(afterCrash === 0 ? status !== 'committed' : status === 'committed').toBe(true);
    console.log(`killed ${Math.round(commitMs * 0.5)} ms into a ${Math.round(commitMs)} ms commit: ${afterCrash} of ${LINES} lines present, import ${status}`);

    const again = await startApp();
    extra.push(again);
    const c2 = new Client(again.url);
    expect((await c2.signIn(co.emails.bookkeeper, PASSWORD)).status).toBe(200);
    const r = await c2.post(`/api/receipts/imports/${importId}/commit`, {});
    expect([200, 409]).toContain(r.status);
    expect(await costLinesOf(importId)).toBe(LINES);
  });
});
