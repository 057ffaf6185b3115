import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { notFound } from '../../lib/errors.ts';
import { DEFAULT_OVER_FLAG_PCT, jobCosting, type JobCosting } from '../../lib/costs/costing.ts';
import { TIME_TASKS, type TimeTask } from '../../lib/labour/tasks.ts';
import { findJob } from '../repos/jobs.ts';
import { jobCostingFigures } from '../repos/costs.ts';

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
  // The job (scoped to the company, and to the crew lead's jobs where that applies), then
  // every figure its costing needs in one read.
  const job = await findJob(actor.companyId, jobId, {}, k);
  if (!job) throw notFound('That job');
  const f = await jobCostingFigures(actor.companyId, jobId, k);
  const costing = jobCosting({
    estimates: f.estimates,
    actuals: f.actuals,
    contractCents: job.contractCents,
    changeOrdersCents: f.approvedChangeOrdersCents,
    flagPct: flagPct ?? f.costFlagPct ?? DEFAULT_OVER_FLAG_PCT,
  });
  return {
    jobId,
    jobCode: job.code,
    ...costing,
    hoursByTask: TIME_TASKS.map((task) => ({ task, hours: f.hoursByTask.find((h) => h.task === task)?.hours ?? 0 })),
    unpricedRentals: f.unpricedRentals,
  };
}
