import { randomBytes } from 'node:crypto';
import type { TestCompany } from './factory';
import { makeCustomer, makeJob } from './factory';
import { upload } from '../api/receipts-helpers';

type Fixture = { params: (co: TestCompany) => Promise<Record<string, string>> };

async function ok(p: Promise<{ status: number; text: string; body: any }>, what: string) {
  const r = await p;
  if (r.status >= 300) throw new Error(`${what}: ${r.status} ${r.text.slice(0, 300)}`);
  return r.body;
}

/** A job being built, assigned to the company's crew lead (hours and rentals need a won job). */
async function crewJob(co: TestCompany) {
  return makeJob(co.owner, (await makeCustomer(co.owner)).id, { crewLeadUserId: co.userIds.crew_lead, status: 'building' });
}

/** A receipt upload with one matched and one unmatched line, made unique so it is never a duplicate. */
async function receiptImport(co: TestCompany, commit: boolean) {
  const job = await crewJob(co);
  const n = randomBytes(4).toString('hex');
  const csv = ['Date,Invoice #,Line,SKU,Description,Qty,Unit Price,Ext,PO', `3/2/2026,R-${n},1,PT4410,Post,2,$14.20,$28.40,${job.code}`, `3/2/2026,R-${n},2,CB80,Concrete,3,$6.45,$19.35,nowhere`].join('\n');
  const imp = await ok(upload(co.bookkeeper, '/api/receipts/imports', { name: `r-${n}.csv`, content: csv }, { supplier: 'Matrix Yard' }), 'receipt upload');
  if (commit) await ok(co.bookkeeper.post(`/api/receipts/imports/${imp.id}/commit`, {}), 'commit');
  const lines = await ok(co.bookkeeper.get(`/api/receipts/imports/${imp.id}/lines`), 'lines');
  return { importId: String(imp.id), lineId: String(lines.items[0].id), unmatchedLineId: String(lines.items[1].id) };
}

async function worker(co: TestCompany) {
  return ok(co.bookkeeper.post('/api/workers', { name: `Matrix ${randomBytes(3).toString('hex')}`, wageCents: 2500 }), 'worker');
}

async function timesheetImport(co: TestCompany) {
  const w = await worker(co);
  const job = await crewJob(co);
  const csv = ['Date,Employee,Job,Hours,Task', `5/11/2026,${w.name},${job.code},8,Gates`].join('\n');
  const imp = await ok(upload(co.bookkeeper, '/api/time/imports', { name: `t-${randomBytes(3).toString('hex')}.csv`, content: csv }), 'timesheet');
  const lines = await ok(co.bookkeeper.get(`/api/time/imports/${imp.id}/lines`), 'lines');
  return { id: String(imp.id), lineId: String(lines.items[0].id) };
}

/** Ids for the permission matrix's routes of the actual-costs feature. */
export const COSTS_FIXTURES: Record<string, Fixture> = {
  '/api/jobs/[id]/costing': { params: async (co) => ({ id: String((await crewJob(co)).id) }) },
  '/api/costs/[id]': {
    params: async (co) => {
      const job = await crewJob(co);
      const c = await ok(co.bookkeeper.post('/api/costs', { jobId: job.id, category: 'permit', date: '2026-03-28', description: 'Matrix permit', amountCents: 1000 }), 'cost');
      return { id: String(c.id) };
    },
  },
  '/api/receipts/imports/[id]': { params: async (co) => ({ id: (await receiptImport(co, false)).importId }) },
  '/api/receipts/imports/[id]/commit': { params: async (co) => ({ id: (await receiptImport(co, false)).importId }) },
  '/api/receipts/imports/[id]/file': { params: async (co) => ({ id: (await receiptImport(co, false)).importId }) },
  '/api/receipts/imports/[id]/lines': { params: async (co) => ({ id: (await receiptImport(co, false)).importId }) },
  '/api/receipts/imports/[id]/lines/[lineId]': { params: async (co) => { const r = await receiptImport(co, false); return { id: r.importId, lineId: r.lineId }; } },
  '/api/receipts/lines/[id]/allocation': { params: async (co) => ({ id: (await receiptImport(co, true)).unmatchedLineId }) },
  '/api/receipts/lines/[id]/split': { params: async (co) => ({ id: (await receiptImport(co, true)).unmatchedLineId }) },
  '/api/time/[id]': {
    params: async (co) => {
      const w = await worker(co);
      const job = await crewJob(co);
      const t = await ok(co.bookkeeper.post('/api/time', { jobId: job.id, date: '2026-05-04', task: 'gates', workers: [{ workerId: w.id, hours: 2 }] }), 'time');
      return { id: String(t.items[0].id) };
    },
  },
  '/api/time/imports/[id]': { params: async (co) => ({ id: (await timesheetImport(co)).id }) },
  '/api/time/imports/[id]/commit': { params: async (co) => ({ id: (await timesheetImport(co)).id }) },
  '/api/time/imports/[id]/file': { params: async (co) => ({ id: (await timesheetImport(co)).id }) },
  '/api/time/imports/[id]/lines': { params: async (co) => ({ id: (await timesheetImport(co)).id }) },
  '/api/time/imports/[id]/lines/[lineId]': { params: async (co) => timesheetImport(co) },
  '/api/rentals/[id]': {
    params: async (co) => {
      const job = await crewJob(co);
      const r = await ok(co.bookkeeper.post('/api/rentals', { jobId: job.id, kind: 'earth_auger', startAt: '2026-05-04T07:00', endAt: '2026-05-04T17:00', dayCents: 9000 }), 'rental');
      return { id: String(r.id) };
    },
  },
  '/api/workers/[id]': { params: async (co) => ({ id: String((await worker(co)).id) }) },
};
