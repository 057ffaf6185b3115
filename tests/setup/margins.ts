import type { Client } from './client';
import { makeCustomer, makeJob, type TestCompany } from './factory';
import { importPriceBook, readyToBuild, styleId } from './bids';
import { draft, issue } from './invoices';
import { testDb } from './db';

async function ok<T = any>(p: Promise<{ status: number; body: T; text: string }>, what: string): Promise<T> {
  const r = await p;
  if (r.status >= 300) throw new Error(`${what}: ${r.status} ${r.text.slice(0, 400)}`);
  return r.body;
}

export interface JobSpec {
  style: 'wood_privacy' | 'chain_link';
  status: 'won' | 'building' | 'completed' | 'closed';
  lengthFt: number;
  /** crew hours logged ÷ the bid's, every task */
  labour?: number;
  /** concrete bought ÷ the takeoff before waste (otherwise the bid's buy list) */
  concrete?: number;
  startDate?: string;
  completedDate?: string;
  /** the estimator bids it (else the owner is its estimator) */
  byEstimator?: boolean;
  /** progress bill at this percent of the contract, and how much of it is paid */
  billPct?: number;
  paidPct?: number;
  changeOrder?: { priceCents: number; materialCents: number };
  /** an auger rental at this cost, cents */
  rentalCents?: number;
}

export interface BuiltJob { jobId: number; bidId: number; code: string; spec: JobSpec }

const workers = new WeakMap<TestCompany, number>();
const priced = new WeakSet<TestCompany>();

/** A price book and one crew member ($30 an hour) for the company, once. */
export async function readyToCost(co: TestCompany): Promise<number> {
  if (!priced.has(co)) { await importPriceBook(co.owner); priced.add(co); }
  let w = workers.get(co);
  if (!w) {
    w = (await ok(co.owner.post('/api/workers', { name: `Crew ${Math.random().toString(36).slice(2, 8)}`, wageCents: 3000 }), 'worker')).id as number;
    workers.set(co, w);
  }
  return w;
}

const TIME_TASK: Record<string, string> = { posts: 'dig_set_posts', rails_infill: 'rails_infill', gates: 'gates', setup: 'cleanup' };

/**
 * One job the way the company runs it: bid and accepted through the API, moved along its
 * statuses, crew hours logged through the API (the bid's hours by task × `labour`), and the
 * bid's buy list bought (concrete scaled when asked) as receipt cost lines.
 */
export async function buildJob(co: TestCompany, spec: JobSpec): Promise<BuiltJob> {
  const worker = await readyToCost(co);
  const customer = await makeCustomer(co.owner);
  const style = await styleId(co.owner, spec.style);
  const job = await makeJob(co.owner, customer.id, { fenceStyleId: style, estimatorUserId: spec.byEstimator ? co.userIds.estimator : co.userIds.owner, crewLeadUserId: co.userIds.crew_lead });
  const bidder: Client = spec.byEstimator ? co.estimator : co.owner;
  const height = spec.style === 'chain_link' ? 48 : 72;
  const bid = await ok(bidder.post(`/api/jobs/${job.id}/bids`, { styleId: style, runs: [{ lengthFt: spec.lengthFt, heightIn: height, label: 'Back' }], gates: [{ runIndex: 0, widthFt: 4 }], target: { mode: 'margin', pct: 30 } }), 'bid');
  await ok(bidder.post(`/api/jobs/${job.id}/bids/${bid.id}/accept`, {}), 'accept');
  const start = spec.startDate ?? (spec.completedDate ? new Date(Date.parse(`${spec.completedDate}T00:00:00Z`) - 20 * 86_400_000).toISOString().slice(0, 10) : '2026-03-02');
  if (spec.status !== 'won') {
    await readyToBuild(co.owner, job.id);
    await ok(co.owner.patch(`/api/jobs/${job.id}`, { status: 'building', startDate: start }), 'building');
  }
  if (spec.changeOrder) {
    const c = await ok(co.owner.post('/api/change-orders', { jobId: job.id, description: 'Extend the back run', priceCents: spec.changeOrder.priceCents, costs: { material: spec.changeOrder.materialCents } }), 'change order');
    await ok(co.owner.post(`/api/change-orders/${c.id}/decision`, { decision: 'approved', decidedOn: start, approvedByName: 'The customer' }), 'approve');
  }
  if (spec.status !== 'won') {
    const f = spec.labour ?? 1;
    for (const l of bid.labour as { task: string; manHours: number }[]) {
      let left = Math.round(l.manHours * f * 4) / 4;
      for (let day = 0; left > 0; day++) {
        const hours = Math.min(left, 10);
        await ok(co.owner.post('/api/time', { jobId: job.id, date: start, task: TIME_TASK[l.task], workers: [{ workerId: worker, hours }] }), 'time');
        left = Math.round((left - hours) * 4) / 4;
      }
    }
    const lines = (bid.lines as { kind: string; sku: string; qty: number; takeoffQty: number; unitCostCents: number; key: string }[]).filter((l) => l.kind === 'material');
    const rows = lines.map((l) => {
      const qty = l.sku === 'CONC-50' && spec.concrete ? Math.round(l.takeoffQty * spec.concrete) : l.qty;
      return { organization_id: co.id, source: 'receipt', job_id: job.id, category: 'material', cost_date: start, description: `Bought for ${job.code}`, sku: l.sku, quantity: qty, unit: 'each', amount_cents: Math.round(qty * l.unitCostCents) };
    });
    if (rows.length) await testDb()('cost_lines').insert(rows);
    if (spec.rentalCents) {
      await testDb()('rentals').insert({ organization_id: co.id, job_id: job.id, kind: 'earth_auger', start_at: `${start} 07:00`, end_at: `${start} 15:00`, days: 1, cost_cents: spec.rentalCents });
    }
  }
  if (spec.billPct) {
    const inv = await draft(co.owner, { jobId: job.id, kind: 'progress', basisPct: spec.billPct });
    const issued = await issue(co.owner, inv.id);
    if (spec.paidPct) await ok(co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: Math.round((issued.totalCents * spec.paidPct) / 100), method: 'check', receivedOn: issued.today ?? start }), 'payment');
  }
  if (spec.status === 'completed' || spec.status === 'closed') {
    await ok(co.owner.patch(`/api/jobs/${job.id}`, { status: spec.status, completedDate: spec.completedDate ?? '2026-04-10', ...(spec.status === 'closed' ? { closedDate: spec.completedDate ?? '2026-04-10' } : {}) }), 'finish');
  }
  return { jobId: job.id, bidId: bid.id, code: job.code, spec };
}

export async function buildJobs(co: TestCompany, specs: JobSpec[]): Promise<BuiltJob[]> {
  const out: BuiltJob[] = [];
  for (const s of specs) out.push(await buildJob(co, s));
  return out;
}

/**
 * Ids for the margin and calibration routes, in the shape the permission-matrix test's
 * FIXTURES take: an exclusion on a finished job of the company.
 */
export const MARGINS_FIXTURES: Record<string, { params: (co: TestCompany) => Promise<Record<string, string>> }> = {
  '/api/calibration/exclusions/[id]': {
    params: async (co) => {
      const customer = await makeCustomer(co.owner);
      const job = await makeJob(co.owner, customer.id, { status: 'completed' });
      const e = await ok(co.owner.post('/api/calibration/exclusions', { jobId: job.id, scope: 'job', reason: 'Probe exclusion' }), 'exclusion');
      return { id: String(e.id) };
    },
  },
};
