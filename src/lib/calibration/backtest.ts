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
  /**
   * Today's rate, when it differs from the one the job was bid with: the backtest's
   * "current" estimate re-prices this work at it, so the comparison is today's rates
   * against the suggestion, not the rates of the day each job was bid.
   */
  currentRate?: number;
  /**
   * What this work costs the bid at a rate, cents, when that is not linear in the rate (rental
   * days round up to whole or half days). Without it, a rate change re-prices
   * (rate − bid rate) × quantity × hourCostCents.
   */
  costAt?: (rate: number) => number;
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
  /** The range a rate may take (a recipe's limits): a suggestion outside is held at the edge. */
  bounds?: { min: number; max: number };
  /** Rounding step "suggested rate": half away from zero to this many decimals, as stored. */
  decimals?: number;
}

function settle(rate: number, opts: SuggestOptions): number {
  let r = rate;
  if (opts.bounds) r = Math.min(opts.bounds.max, Math.max(opts.bounds.min, r));
  if (opts.decimals !== undefined) {
    const f = 10 ** opts.decimals;
    r = (Math.sign(r) * Math.round(Math.abs(r) * f)) / f;
  }
  return r;
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
  return { rate: settle(rate, opts), n: usable.length, spread: spread(rates) };
}

const roundAway = (x: number) => Math.sign(x) * Math.round(Math.abs(x));

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

export function summarise(pairs: { estimate: number; actual: number }[]): ErrorSummary {
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
 * bid cost with this work's hours re-priced: (fitted rate − bid rate) × quantity × hour cost,
 * rounded half away from zero to the cent (Math.round would send −0.5 up, not away).
 */
export function backtest(obs: readonly RateObservation[], opts: SuggestOptions = {}): Backtest {
  const rows: BacktestRow[] = obs.map((o, i) => {
    const others = obs.filter((_, j) => j !== i);
    const fit = suggestRate(others, opts).rate;
    const reprice = (rate: number) => o.estimatedCostCents + (o.costAt ? o.costAt(rate) - o.costAt(o.bidRate) : roundAway((rate - o.bidRate) * o.quantity * o.hourCostCents));
    const suggestedCost = fit === null ? null : reprice(fit);
    const currentCost = o.currentRate === undefined ? o.estimatedCostCents : reprice(o.currentRate);
    return { jobId: o.jobId, actualCostCents: o.actualCostCents, currentCostCents: currentCost, suggestedCostCents: suggestedCost, fittedRate: fit };
  });
  const current = summarise(rows.map((r) => ({ estimate: r.currentCostCents, actual: r.actualCostCents })));
  const fitted = rows.filter((r) => r.suggestedCostCents !== null);
  const suggested = fitted.length === rows.length && rows.length > 0 ? summarise(rows.map((r) => ({ estimate: r.suggestedCostCents!, actual: r.actualCostCents }))) : null;
  return { n: rows.length, current, suggested, rows, improves: suggested !== null && suggested.mape < current.mape };
}
