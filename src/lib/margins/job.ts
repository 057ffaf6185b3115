import type { JobStatus } from '../jobs/schema.ts';

/**
 * A job's money as the margin reports see it: contract to date, estimated and actual cost
 * in four groups, billed and collected. Pure arithmetic on integer cents; every rounding is
 * named where it happens.
 */

/** The report's cost groups: the cost categories with subcontract, permits and disposal as other. */
export const COST_GROUPS = ['material', 'labour', 'rental', 'other'] as const;
export type CostGroup = (typeof COST_GROUPS)[number];
export const COST_GROUP_LABELS: Record<CostGroup, string> = { material: 'Material', labour: 'Labour', rental: 'Rental', other: 'Other' };
export type ByGroup = Record<CostGroup, number>;

export const FINISHED_STATUSES: readonly JobStatus[] = ['completed', 'closed'];

/** One job's rows, summed in the database (see repos/reports.ts). */
export interface JobFigures {
  jobId: number;
  code: string;
  title: string;
  status: JobStatus;
  customerName: string;
  styleId: number | null;
  styleName: string | null;
  estimatorUserId: string | null;
  estimatorName: string | null;
  /** The day the job counts on: completed, else started, else won (YYYY-MM-DD). */
  reportDate: string | null;
  /** jobs.contract_cents: the accepted bid's price, null before one is accepted. */
  contractBaseCents: number | null;
  approvedChangeOrdersCents: number;
  estimated: ByGroup;
  actual: ByGroup;
  /** Billed against the contract by issued invoices (void excluded). */
  billedCents: number;
  /** Paid on those invoices, refunds taken off. */
  collectedCents: number;
  /** Feet of fence in the accepted bid, gate openings included; null without one. */
  linearFt: number | null;
}

export const groupTotal = (g: ByGroup): number => COST_GROUPS.reduce((a, k) => a + g[k], 0);
export const emptyGroups = (): ByGroup => ({ material: 0, labour: 0, rental: 0, other: 0 });

/** Rounding step "percent": a ratio as a percent to one decimal, half away from zero (what screen and CSV both show). */
export function pct1(numerator: number, denominator: number): number | null {
  if (!denominator || !Number.isFinite(numerator / denominator)) return null;
  const v = (numerator / denominator) * 100;
  return (Math.sign(v) * Math.round(Math.abs(v) * 10)) / 10;
}

/** Rounding step "per foot": cents ÷ feet to the cent, half away from zero; null without feet. */
export function centsPerFoot(cents: number, feet: number): number | null {
  if (!(feet > 0)) return null;
  const v = cents / feet;
  return Math.sign(v) * Math.round(Math.abs(v));
}

type Carried = 'jobId' | 'code' | 'title' | 'status' | 'customerName' | 'styleId' | 'styleName' | 'estimatorName' | 'reportDate' | 'approvedChangeOrdersCents' | 'estimated' | 'actual' | 'billedCents' | 'collectedCents' | 'linearFt';

export interface JobMargin extends Pick<JobFigures, Carried> {
  /** True for completed and closed jobs: the figures are final. */
  final: boolean;
  /** Contract to date: the accepted price with approved change orders. */
  contractCents: number;
  estimatedCostCents: number;
  costToDateCents: number;
  grossProfitCents: number;
  /** Gross profit ÷ contract, percent (one decimal); null without a contract. */
  marginPct: number | null;
  /** (Contract − estimated cost) ÷ contract: the margin the bid planned. */
  estimatedMarginPct: number | null;
  /** Actual − estimated margin, percentage points (one decimal). */
  marginDeltaPts: number | null;
  grossProfitPerFtCents: number | null;
}

export function jobMargin(f: JobFigures): JobMargin {
  const contractCents = (f.contractBaseCents ?? 0) + f.approvedChangeOrdersCents;
  const estimatedCostCents = groupTotal(f.estimated);
  const costToDateCents = groupTotal(f.actual);
  const grossProfitCents = contractCents - costToDateCents;
  const marginPct = pct1(grossProfitCents, contractCents);
  const estimatedMarginPct = pct1(contractCents - estimatedCostCents, contractCents);
  return {
    jobId: f.jobId, code: f.code, title: f.title, status: f.status, customerName: f.customerName, styleId: f.styleId, styleName: f.styleName,
    estimatorName: f.estimatorName, reportDate: f.reportDate, final: FINISHED_STATUSES.includes(f.status),
    contractCents, approvedChangeOrdersCents: f.approvedChangeOrdersCents, billedCents: f.billedCents, collectedCents: f.collectedCents,
    estimatedCostCents, costToDateCents, estimated: f.estimated, actual: f.actual, grossProfitCents, marginPct, estimatedMarginPct,
    marginDeltaPts: marginPct === null || estimatedMarginPct === null ? null : Math.round((marginPct - estimatedMarginPct) * 10) / 10,
    linearFt: f.linearFt, grossProfitPerFtCents: f.linearFt ? centsPerFoot(grossProfitCents, f.linearFt) : null,
  };
}
