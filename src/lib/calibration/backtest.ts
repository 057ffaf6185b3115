import { median, spread, weightedMedian, type Spread } from '../stats/robust.ts';

/**
 * Calibration of a productivity rate (hours per linear foot, per hole, per gate, ...) from
 * finished jobs, and a leave-one-out backtest of what the bids' error would have been.
 *
 * The suggestion is the median of the rates the jobs actually achieved (actual hours ÷
 * quantity). A median, not a mean: one job that went wrong (a rock ledge, a crew short for a
 * week) moves a mean a long way and a median hardly at all. With recencyHalfLifeDays set,
 * it is a weighted median where a job's weight halves every half-life, so the estimate
 * follows a crew that is getting faster or slower.
 */

export interface RateObservation {
  jobId: number;
  /** The quantity the rate applies to (linear feet, holes, gates, jobs). */
  quantity: number;
  /** Hours the job actually took for this work. */
  actualHours: number;
  /** Days between the job's completion and the day of the calibration. */
  ageDays: number;
  /** Cost of one labour hour with burden, in cents, to turn hours into cost. */
  hourCostCents: number;
  /** The job's estimated total cost and actual total cost, in cents (for the cost backtest). */
  estimatedCostCents: number;
  actualCostCents: number;
  /** The rate the job was bid with. */
  bidRate: number;
}

export interface Suggestion {
  /** null when the jobs are too few to say anything. */
  rate: number | null;
  n: number;
  spread: Spread | null;
  reason?: string;
}

export interface SuggestOptions {
  minJobs?: number;
  recencyHalfLifeDays?: number;
}

export const MIN_JOBS = 4;

export function achievedRate(o: RateObservation): number {
  return o.actualHours / o.quantity;
}

export function suggestRate(obs: readonly RateObservation[], opts: SuggestOptions = {}): Suggestion {
  const usable = obs.filter((o) => o.quantity > 0 && Number.isFinite(o.actualHours) && o.actualHours >= 0);
  const min = opts.minJobs ?? MIN_JOBS;
  if (usable.length < min) {
    return { rate: null, n: usable.length, spread: null, reason: `Only ${usable.length} finished job${usable.length === 1 ? '' : 's'} with this work; at least ${min} are needed.` };
  }
  const rates = usable.map(achievedRate);
  const rate = opts.recencyHalfLifeDays
    ? weightedMedian(usable.map((o, i) => ({ value: rates[i], weight: 0.5 ** (o.ageDays / opts.recencyHalfLifeDays!) })))
    : median(rates);
  return { rate, n: usable.length, spread: spread(rates) };
}

export interface ErrorSummary {
  /** Mean absolute percentage error of the estimated cost against the actual, in percent. */
  mape: number;
  /** Mean signed error in percent: negative means the bids ran low (cost more than bid). */
  bias: number;
}

export interface BacktestRow {
  jobId: number;
  actualCostCents: number;
  currentCostCents: number;
  suggestedCostCents: number | null;
  /** The rate fitted without this job. */
  fittedRate: number | null;
}

export interface Backtest {
  n: number;
  current: ErrorSummary;
  suggested: ErrorSummary | null;
  rows: BacktestRow[];
  /** True when the suggestion lowers the mean absolute percentage error. */
  improves: boolean;
}

function summarise(pairs: { estimate: number; actual: number }[]): ErrorSummary {
  const errors = pairs.filter((p) => p.actual > 0).map((p) => ((p.estimate - p.actual) / p.actual) * 100);
  if (errors.length === 0) return { mape: 0, bias: 0 };
  return {
    mape: errors.reduce((s, e) => s + Math.abs(e), 0) / errors.length,
    bias: errors.reduce((s, e) => s + e, 0) / errors.length,
  };
}

/**
 * Leave-one-out: each job is judged by a rate fitted on the other jobs only, so the backtest
 * cannot flatter the suggestion with the job it is judging. A job's re-estimated cost is its
 * bid cost with this work's hours re-priced: (fitted rate − bid rate) × quantity × hour cost.
 */
export function backtest(obs: readonly RateObservation[], opts: SuggestOptions = {}): Backtest {
  const rows: BacktestRow[] = obs.map((o, i) => {
    const others = obs.filter((_, j) => j !== i);
    const fit = suggestRate(others, opts).rate;
    const suggestedCost = fit === null ? null : Math.round(o.estimatedCostCents + (fit - o.bidRate) * o.quantity * o.hourCostCents);
    return { jobId: o.jobId, actualCostCents: o.actualCostCents, currentCostCents: o.estimatedCostCents, suggestedCostCents: suggestedCost, fittedRate: fit };
  });
  const current = summarise(rows.map((r) => ({ estimate: r.currentCostCents, actual: r.actualCostCents })));
  const fitted = rows.filter((r) => r.suggestedCostCents !== null);
  const suggested = fitted.length === rows.length && rows.length > 0 ? summarise(rows.map((r) => ({ estimate: r.suggestedCostCents!, actual: r.actualCostCents }))) : null;
  return { n: rows.length, current, suggested, rows, improves: suggested !== null && suggested.mape < current.mape };
}
