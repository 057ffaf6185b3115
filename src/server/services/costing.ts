import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { Actor } from '../http.ts';
import { notFound } from '../../lib/errors.ts';
import { jobCosting, type JobCosting } from '../../lib/costs/costing.ts';
import type { CostCategory } from '../../lib/costs/categories.ts';
import { TIME_TASKS, type TimeTask } from '../../lib/labour/tasks.ts';
import { findJob } from '../repos/jobs.ts';
import { actualByCategory } from '../repos/costs.ts';
import { hoursByTask } from '../repos/time-entries.ts';

export interface JobCostingView extends JobCosting {
  jobId: number;
  jobCode: string;
  /** crew hours by task, for comparing with the bid's rates */
  hoursByTask: { task: TimeTask; hours: number }[];
  /** rentals logged without rates, so not yet in the cost */
  unpricedRentals: number;
}

let changeOrderColumns: { amount: string; approved: string } | null | undefined;

/**
 * Approved change orders add to the contract price. The invoicing feature owns that table;
 * it is read here only when it exists with an amount and an approval column, else 0.
 */
async function approvedChangeOrdersCents(k: Knex, companyId: string, jobId: number): Promise<number> {
  if (changeOrderColumns === undefined) {
    const [cols] = await k.raw("SELECT column_name AS c FROM information_schema.columns WHERE table_schema = DATABASE() AND table_name = 'change_orders'");
    const names = new Set((cols as { c: string }[]).map((r) => r.c));
    const amount = ['amount_cents', 'price_cents', 'total_cents'].find((c) => names.has(c));
    const approved = ['approved_on', 'approved_at', 'approved_date'].find((c) => names.has(c)) ?? (names.has('status') ? 'status' : undefined);
    changeOrderColumns = amount && approved && names.has('job_id') ? { amount, approved } : null;
  }
  if (!changeOrderColumns) return 0;
  const { amount, approved } = changeOrderColumns;
  const q = k('change_orders').where({ organization_id: companyId, job_id: jobId });
  if (approved === 'status') q.andWhere('status', 'approved');
  else q.whereNotNull(approved);
  const [r] = await q.sum({ s: amount });
  return toInt(r?.s ?? 0);
}

/** A job's estimated and actual cost by category, variance, and margin so far. */
export async function getJobCosting(actor: Actor, jobId: number, flagPct?: number, k: Knex = db()): Promise<JobCostingView> {
  const job = await findJob(actor.companyId, jobId, {}, k);
  if (!job) throw notFound('That job');
  const estimates = (await k('job_estimates').where({ organization_id: actor.companyId, job_id: jobId }).select('category', 'amount_cents', 'source')).map((r) => ({
    category: r.category as CostCategory,
    amountCents: toInt(r.amount_cents),
    source: r.source as string,
  }));
  const [actuals, changeOrders, hours, unpriced] = await Promise.all([
    actualByCategory(actor.companyId, jobId, k),
    approvedChangeOrdersCents(k, actor.companyId, jobId).catch(() => 0),
    hoursByTask(actor.companyId, jobId, k),
    k('rentals').where({ organization_id: actor.companyId, job_id: jobId }).whereNull('cost_cents').count({ n: '*' }).first(),
  ]);
  const costing = jobCosting({ estimates, actuals, contractCents: job.contractCents, changeOrdersCents: changeOrders, flagPct });
  return {
    jobId,
    jobCode: job.code,
    ...costing,
    hoursByTask: TIME_TASKS.map((task) => ({ task, hours: hours.find((h) => h.task === task)?.hours ?? 0 })),
    unpricedRentals: Number((unpriced as { n?: number } | undefined)?.n ?? 0),
  };
}
