/**
 * Work in progress by the percentage-of-completion (cost-to-cost) method that contractors'
 * accountants use: how far along a job is by cost, what it has earned, and whether it is
 * billed ahead of or behind that. All money in integer cents.
 */

export interface WipInput {
  contractCents: number;
  /** Current estimate of the job's total cost (bid estimate plus approved change orders). */
  estimatedTotalCostCents: number;
  costToDateCents: number;
  billedToDateCents: number;
}

export interface WipRow {
  /** Cost to date ÷ estimated total cost, as a fraction, capped at 1. */
  percentComplete: number;
  /** True when cost to date has passed the estimate (the job is over its estimate). */
  overEstimate: boolean;
  earnedCents: number;
  /** Billed − earned: positive is over-billing (billings in excess), negative under-billing. */
  overUnderCents: number;
  /** Contract − the larger of estimate and cost to date. */
  projectedGrossProfitCents: number;
  /** Projected gross margin as a fraction of the contract (null without a contract). */
  projectedMargin: number | null;
}

/** Rounds half to even, the banker's rule, so many rows do not drift one way. */
export function roundHalfEven(x: number): number {
  const r = Math.round(x);
  return Math.abs(x % 1) === 0.5 && r % 2 !== 0 ? r - 1 : r;
}

export function wipRow(j: WipInput): WipRow {
  for (const [k, v] of Object.entries(j)) if (!Number.isSafeInteger(v)) throw new Error(`${k} must be integer cents, got ${v}`);
  const raw = j.estimatedTotalCostCents > 0 ? j.costToDateCents / j.estimatedTotalCostCents : 0;
  const percentComplete = Math.min(1, Math.max(0, raw));
  // Rounding step "earned revenue": contract × percent complete, half-even to the cent.
  const earnedCents = roundHalfEven(j.contractCents * percentComplete);
  const projectedCost = Math.max(j.estimatedTotalCostCents, j.costToDateCents);
  const projectedGrossProfitCents = j.contractCents - projectedCost;
  return {
    percentComplete,
    overEstimate: raw > 1,
    earnedCents,
    overUnderCents: j.billedToDateCents - earnedCents,
    projectedGrossProfitCents,
    projectedMargin: j.contractCents > 0 ? projectedGrossProfitCents / j.contractCents : null,
  };
}

export interface WipTotals {
  contractCents: number;
  costToDateCents: number;
  earnedCents: number;
  billedToDateCents: number;
  overBilledCents: number;
  underBilledCents: number;
  netOverUnderCents: number;
}

export function wipTotals(rows: readonly (WipInput & WipRow)[]): WipTotals {
  const t: WipTotals = { contractCents: 0, costToDateCents: 0, earnedCents: 0, billedToDateCents: 0, overBilledCents: 0, underBilledCents: 0, netOverUnderCents: 0 };
  for (const r of rows) {
    t.contractCents += r.contractCents;
    t.costToDateCents += r.costToDateCents;
    t.earnedCents += r.earnedCents;
    t.billedToDateCents += r.billedToDateCents;
    if (r.overUnderCents > 0) t.overBilledCents += r.overUnderCents;
    else t.underBilledCents -= r.overUnderCents;
    t.netOverUnderCents += r.overUnderCents;
  }
  return t;
}
