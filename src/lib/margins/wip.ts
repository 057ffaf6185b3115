import { wipRow, wipTotals, type WipTotals } from '../wip/wip.ts';
import { COST_GROUPS, groupTotal, pct1, type JobMargin } from './job.ts';

/**
 * Work in progress by percent of completion (cost to cost) and the margin each open job is
 * heading for. The projection keeps every group's overrun already spent and credits no
 * underrun before the job is done: projected cost = Σ over groups of the larger of its
 * estimate and its cost to date. A job is at risk when that projected margin, shown to one
 * decimal, is below the company's target margin.
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
  estimatedCostCents: number;
  costToDateCents: number;
  /** Cost to date ÷ estimated total cost, percent (one decimal), capped at 100. */
  percentComplete: number;
  overEstimate: boolean;
  earnedCents: number;
  billedCents: number;
  /** Billed − earned: positive is billed ahead of the work (over), negative behind (under). */
  overUnderCents: number;
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
  const w = wipRow({ contractCents: j.contractCents, estimatedTotalCostCents: groupTotal(j.estimated), costToDateCents: j.costToDateCents, billedToDateCents: j.billedCents });
  const projected = projectedCostCents(j);
  const projectedMarginPct = pct1(j.contractCents - projected, j.contractCents);
  return {
    jobId: j.jobId, code: j.code, title: j.title, status: j.status, styleName: j.styleName, estimatorName: j.estimatorName, customerName: j.customerName,
    contractCents: j.contractCents, estimatedCostCents: j.estimatedCostCents, costToDateCents: j.costToDateCents,
    percentComplete: pct1(w.percentComplete, 1) ?? 0, overEstimate: w.overEstimate, earnedCents: w.earnedCents, billedCents: j.billedCents,
    overUnderCents: w.overUnderCents, projectedCostCents: projected, projectedGrossProfitCents: j.contractCents - projected, projectedMarginPct,
    estimatedMarginPct: j.estimatedMarginPct, atRisk: atRisk(projectedMarginPct, targetMarginPct),
  };
}

export interface WipReport {
  jobs: WipJob[];
  totals: WipTotals & { estimatedCostCents: number; projectedGrossProfitCents: number; atRisk: number };
}

export function wipReport(jobs: readonly JobMargin[], targetMarginPct: number): WipReport {
  const rows = jobs.map((j) => wipJob(j, targetMarginPct));
  const t = wipTotals(rows.map((r) => ({ contractCents: r.contractCents, estimatedTotalCostCents: r.estimatedCostCents, costToDateCents: r.costToDateCents, billedToDateCents: r.billedCents, earnedCents: r.earnedCents, overUnderCents: r.overUnderCents, percentComplete: 0, overEstimate: false, projectedGrossProfitCents: 0, projectedMargin: null })));
  return {
    jobs: rows,
    totals: { ...t, estimatedCostCents: rows.reduce((a, r) => a + r.estimatedCostCents, 0), projectedGrossProfitCents: rows.reduce((a, r) => a + r.projectedGrossProfitCents, 0), atRisk: rows.filter((r) => r.atRisk).length },
  };
}
