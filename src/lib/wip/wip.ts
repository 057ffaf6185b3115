/**
 * Work in progress by the percentage-of-completion (cost-to-cost) method that contractors'
 * accountants use: how far along a job is by cost, what it has earned, and whether it is
 * billed ahead of or behind that. All money in integer cents.
 */

export interface WipInput {
  contractCents: number;
  /**
   * The current estimate of the job's total cost. A job that has already spent more than this
   * is taken to cost at least what it has spent (see wipRow).
   */
  estimatedTotalCostCents: number;
  costToDateCents: number;
  billedToDateCents: number;
}

export interface WipRow {
  /** Cost to date ÷ the current estimated total cost, as a fraction (at most 1). */
  percentComplete: number;
  /** The current estimated total cost: the estimate given, raised to the cost to date when that is more. */
  currentEstimatedCostCents: number;
  /** True when cost to date has passed the estimate given (the job is over its estimate). */
  overEstimate: boolean;
  earnedCents: number;
  /** Billed − earned: positive is over-billing (billings in excess), negative under-billing. */
  overUnderCents: number;
  /** Contract − the current estimated total cost. */
  projectedGrossProfitCents: number;
  /** Projected gross margin as a fraction of the contract (null without a contract). */
  projectedMargin: number | null;
}

/** Rounds half to even, the banker's rule, so many rows do not drift one way. */
export function roundHalfEven(x: number): number {
  const r = Math.round(x);
  return Math.abs(x % 1) === 0.5 && r % 2 !== 0 ? r - 1 : r;
}

/**
 * One job's row. Percent complete is cost to date ÷ the *current* estimate of total cost, and
 * a job cannot have spent more than it will cost: when the cost to date has passed the
 * estimate, the estimate is raised to it. Dividing by the stale estimate instead would show
 * more than the work done and overstate earned revenue (and understate over-billing).
 */
export function wipRow(j: WipInput): WipRow {
  for (const [k, v] of Object.entries(j)) if (!Number.isSafeInteger(v)) throw new Error(`${k} must be integer cents, got ${v}`);
  const currentEstimatedCostCents = Math.max(j.estimatedTotalCostCents, j.costToDateCents, 0);
  const percentComplete = currentEstimatedCostCents > 0 ? Math.max(0, j.costToDateCents) / currentEstimatedCostCents : 0;
  // Rounding step "earned revenue": contract × percent complete, half-even to the cent.
  const earnedCents = roundHalfEven(j.contractCents * percentComplete);
  const projectedGrossProfitCents = j.contractCents - currentEstimatedCostCents;
  return {
    percentComplete,
    currentEstimatedCostCents,
    overEstimate: j.costToDateCents > j.estimatedTotalCostCents,
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

export function wipTotals(rows: readonly (Pick<WipInput, 'contractCents' | 'costToDateCents' | 'billedToDateCents'> & Pick<WipRow, 'earnedCents' | 'overUnderCents'>)[]): WipTotals {
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
