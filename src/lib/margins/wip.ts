import { wipRow, wipTotals, type WipTotals } from '../wip/wip.ts';
import { COST_GROUPS, groupTotal, pct1, type JobMargin } from './job.ts';

/**
 * Work in progress by percent of completion (cost to cost) and the margin each open job is
 * heading for. The current estimate of a job's total cost keeps every group's overrun already
 * spent and credits no underrun before the job is done: projected cost = Σ over groups of
 * the larger of its estimate and its cost to date. Percent complete divides the cost to date
 * by that same projected cost, so a job already over its estimate is not shown further along
 * (nor as having earned more) than it is. A job is at risk when the projected margin, shown
 * to one decimal, is below the company's target margin.
 */

export const WIP_STATUSES = ['won', 'building'] as const;

export interface WipJob {
  jobId: number;
  code: string;
  title: string;
  status: string;
  styleName: string | null;
  estimatorName: string | null;
  customerName: string;
  contractCents: number;
  /** The bid's estimate with approved change orders. */
  estimatedCostCents: number;
  costToDateCents: number;
  /** Cost to date ÷ the current estimated total cost (projectedCostCents), percent, one decimal. */
  percentComplete: number;
  /** Some cost group has already spent past its estimate, so the current estimate is above the bid's. */
  overEstimate: boolean;
  earnedCents: number;
  billedCents: number;
  /** Billed − earned: positive is billed ahead of the work (over), negative behind (under). */
  overUnderCents: number;
  /** The current estimated total cost: Σ over groups of max(estimate, cost to date). */
  projectedCostCents: number;
  projectedGrossProfitCents: number;
  projectedMarginPct: number | null;
  estimatedMarginPct: number | null;
  atRisk: boolean;
}

/** Σ max(estimate, cost to date) over the cost groups, cents. */
export function projectedCostCents(j: Pick<JobMargin, 'estimated' | 'actual'>): number {
  return COST_GROUPS.reduce((a, g) => a + Math.max(j.estimated[g], j.actual[g]), 0);
}

export function atRisk(projectedMarginPct: number | null, targetMarginPct: number): boolean {
  return projectedMarginPct === null || projectedMarginPct < targetMarginPct;
}

export function wipJob(j: JobMargin, targetMarginPct: number): WipJob {
  const projected = projectedCostCents(j);
  // The projection is never below the cost to date (each group is at least its own cost), so
  // wipRow keeps it as the current estimate.
  const w = wipRow({ contractCents: j.contractCents, estimatedTotalCostCents: projected, costToDateCents: j.costToDateCents, billedToDateCents: j.billedCents });
  const projectedMarginPct = pct1(w.projectedGrossProfitCents, j.contractCents);
  return {
    jobId: j.jobId, code: j.code, title: j.title, status: j.status, styleName: j.styleName, estimatorName: j.estimatorName, customerName: j.customerName,
    contractCents: j.contractCents, estimatedCostCents: j.estimatedCostCents, costToDateCents: j.costToDateCents,
    percentComplete: pct1(w.percentComplete, 1) ?? 0, overEstimate: w.currentEstimatedCostCents > groupTotal(j.estimated), earnedCents: w.earnedCents, billedCents: j.billedCents,
    overUnderCents: w.overUnderCents, projectedCostCents: w.currentEstimatedCostCents, projectedGrossProfitCents: w.projectedGrossProfitCents, projectedMarginPct,
    estimatedMarginPct: j.estimatedMarginPct, atRisk: atRisk(projectedMarginPct, targetMarginPct),
  };
}

export interface WipReport {
  jobs: WipJob[];
  totals: WipTotals & { estimatedCostCents: number; projectedCostCents: number; projectedGrossProfitCents: number; atRisk: number };
}

export function wipReport(jobs: readonly JobMargin[], targetMarginPct: number): WipReport {
  const rows = jobs.map((j) => wipJob(j, targetMarginPct));
  const t = wipTotals(rows.map((r) => ({ contractCents: r.contractCents, costToDateCents: r.costToDateCents, billedToDateCents: r.billedCents, earnedCents: r.earnedCents, overUnderCents: r.overUnderCents })));
  const sum = (f: (r: WipJob) => number) => rows.reduce((a, r) => a + f(r), 0);
  return {
    jobs: rows,
    totals: { ...t, estimatedCostCents: sum((r) => r.estimatedCostCents), projectedCostCents: sum((r) => r.projectedCostCents), projectedGrossProfitCents: sum((r) => r.projectedGrossProfitCents), atRisk: rows.filter((r) => r.atRisk).length },
  };
}
