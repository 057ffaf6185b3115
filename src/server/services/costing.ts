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
import { jobContract } from '../repos/change-orders.ts';
import { getSettings } from '../repos/settings.ts';

export interface JobCostingView extends JobCosting {
  jobId: number;
  jobCode: string;
  /** crew hours by task, for comparing with the bid's rates */
  hoursByTask: { task: TimeTask; hours: number }[];
  /** rentals logged without rates, so not yet in the cost */
  unpricedRentals: number;
}

/**
 * A job's estimated and actual cost by category, variance, and margin so far. Categories are
 * flagged past the company's cost flag percent unless the caller asks for another.
 */
export async function getJobCosting(actor: Actor, jobId: number, flagPct?: number, k: Knex = db()): Promise<JobCostingView> {
  const job = await findJob(actor.companyId, jobId, {}, k);
  if (!job) throw notFound('That job');
  const estimates = (await k('job_estimates').where({ organization_id: actor.companyId, job_id: jobId }).select('category', 'amount_cents', 'source')).map((r) => ({
    category: r.category as CostCategory,
    amountCents: toInt(r.amount_cents),
    source: r.source as string,
  }));
  // The contract and its approved change orders as billing reads them (repos/change-orders).
  const [actuals, contract, hours, unpriced, settings] = await Promise.all([
    actualByCategory(actor.companyId, jobId, k),
    jobContract(actor.companyId, jobId, k),
    hoursByTask(actor.companyId, jobId, k),
    k('rentals').where({ organization_id: actor.companyId, job_id: jobId }).whereNull('cost_cents').count({ n: '*' }).first(),
    getSettings(actor.companyId, k),
  ]);
  if (!contract) throw notFound('That job');
  const costing = jobCosting({ estimates, actuals, contractCents: contract.baseCents, changeOrdersCents: contract.approvedChangeOrdersCents, flagPct: flagPct ?? settings.costFlagPct });
  return {
    jobId,
    jobCode: job.code,
    ...costing,
    hoursByTask: TIME_TASKS.map((task) => ({ task, hours: hours.find((h) => h.task === task)?.hours ?? 0 })),
    unpricedRentals: Number((unpriced as { n?: number } | undefined)?.n ?? 0),
  };
}
