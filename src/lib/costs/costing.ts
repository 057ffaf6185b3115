import { add, dinero, subtract, toSnapshot } from 'dinero.js';
import { USD } from 'dinero.js/currencies';
import { COST_CATEGORIES, COST_CATEGORY_LABELS, type CostCategory } from './categories.ts';

/** A category is flagged when its actual cost runs more than this percent over its estimate. */
export const DEFAULT_OVER_FLAG_PCT = 10;

export interface EstimateRow {
  category: CostCategory;
  amountCents: number;
  /** bid or change_order */
  source: string;
}

export interface ActualRow {
  category: CostCategory;
  amountCents: number;
}

export interface CategoryCosting {
  category: CostCategory;
  label: string;
  bidCents: number;
  changeOrderCents: number;
  estimatedCents: number;
  actualCents: number;
  /** actual − estimated: positive is over */
  varianceCents: number;
  /** variance ÷ estimated × 100, two decimals; null with no estimate */
  variancePct: number | null;
  over: boolean;
}

export interface JobCosting {
  categories: CategoryCosting[];
  totals: Omit<CategoryCosting, 'category' | 'label'>;
  /** the contract price, null when none is set */
  contractCents: number | null;
  changeOrdersCents: number;
  /** contract + approved change orders */
  revenueCents: number | null;
  costToDateCents: number;
  /** revenue − cost to date */
  marginSoFarCents: number | null;
  marginSoFarPct: number | null;
  /** revenue − estimated cost: the margin the bid planned */
  plannedMarginCents: number | null;
  plannedMarginPct: number | null;
  flagPct: number;
}

const usd = (c: number) => dinero({ amount: c, currency: USD });
const sum = (xs: number[]) => toSnapshot(xs.reduce((a, c) => add(a, usd(c)), usd(0))).amount;
const minus = (a: number, b: number) => toSnapshot(subtract(usd(a), usd(b))).amount;

/** Rounding step "percent": ratios shown to two decimals, half away from zero. */
export function pct(numerator: number, denominator: number): number | null {
  if (!denominator) return null;
  const v = (numerator / denominator) * 100;
  return Math.sign(v) * Math.round(Math.abs(v) * 100) / 100;
}

function isOver(actual: number, estimated: number, flagPct: number): boolean {
  if (estimated <= 0) return actual > estimated;
  return actual * 100 > estimated * (100 + flagPct);
}

function row(bid: number, co: number, actual: number, flagPct: number) {
  const estimatedCents = sum([bid, co]);
  const varianceCents = minus(actual, estimatedCents);
  return {
    bidCents: bid,
    changeOrderCents: co,
    estimatedCents,
    actualCents: actual,
    varianceCents,
    variancePct: pct(varianceCents, estimatedCents),
    over: isOver(actual, estimatedCents, flagPct),
  };
}

/**
 * A job's cost against its bid, category by category: estimated (accepted bid plus approved
 * change orders), actual, variance, and the margin so far against the contract.
 */
export function jobCosting(input: {
  estimates: EstimateRow[];
  actuals: ActualRow[];
  contractCents: number | null;
  changeOrdersCents: number;
  flagPct?: number;
}): JobCosting {
  const flagPct = input.flagPct ?? DEFAULT_OVER_FLAG_PCT;
  const categories = COST_CATEGORIES.map((category) => {
    const bid = sum(input.estimates.filter((e) => e.category === category && e.source !== 'change_order').map((e) => e.amountCents));
    const co = sum(input.estimates.filter((e) => e.category === category && e.source === 'change_order').map((e) => e.amountCents));
    const actual = sum(input.actuals.filter((a) => a.category === category).map((a) => a.amountCents));
    return { category, label: COST_CATEGORY_LABELS[category], ...row(bid, co, actual, flagPct) };
  });
  const totals = row(
    sum(categories.map((c) => c.bidCents)),
    sum(categories.map((c) => c.changeOrderCents)),
    sum(categories.map((c) => c.actualCents)),
    flagPct,
  );
  const revenue = input.contractCents === null ? null : sum([input.contractCents, input.changeOrdersCents]);
  const margin = revenue === null ? null : minus(revenue, totals.actualCents);
  const planned = revenue === null ? null : minus(revenue, totals.estimatedCents);
  return {
    categories,
    totals,
    contractCents: input.contractCents,
    changeOrdersCents: input.changeOrdersCents,
    revenueCents: revenue,
    costToDateCents: totals.actualCents,
    marginSoFarCents: margin,
    marginSoFarPct: revenue && margin !== null ? pct(margin, revenue) : null,
    plannedMarginCents: planned,
    plannedMarginPct: revenue && planned !== null ? pct(planned, revenue) : null,
    flagPct,
  };
}
