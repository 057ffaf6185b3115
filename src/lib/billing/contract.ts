import { percentOf, split, sum } from './money.ts';
import type { LineCategory, LineInput } from './invoice.ts';

/** The contract today: the accepted price plus every approved change order. */
export function contractToDate(baseCents: number | null, approvedChangeOrders: number[]): number {
  return sum([baseCents ?? 0, ...approvedChangeOrders]);
}

/**
 * The company's deposit cap for a contract: the lesser of a percent of the contract and a
 * fixed amount, either of which may be unset (null = no cap). California's Business and
 * Professions Code §7159.5(a)(3) is 10 % or $1,000, whichever is less.
 */
export function depositCap(contractCents: number, rule: { pct: number | null; cents: number | null }): number | null {
  const caps: number[] = [];
  if (rule.pct !== null) caps.push(percentOf(contractCents, rule.pct));
  if (rule.cents !== null) caps.push(rule.cents);
  return caps.length ? Math.min(...caps) : null;
}

/** A deposit asked as a percent of the contract (rounded once, half away from zero) or as an amount. */
export function depositAmount(contractCents: number, ask: { pct: number | null; cents: number | null }): number {
  if (ask.cents !== null) return ask.cents;
  return percentOf(contractCents, ask.pct ?? 0);
}

/**
 * Progress billing by percent complete: earned to date = contract to date × percent
 * complete (rounded once to the cent), and this bill = earned − billed before.
 */
export function progressAmount(a: { contractCents: number; percentComplete: number; billedBeforeCents: number }): { earnedCents: number; billCents: number } {
  const earnedCents = percentOf(a.contractCents, a.percentComplete);
  return { earnedCents, billCents: earnedCents - a.billedBeforeCents };
}

/** The final bill: what is left of the contract, and the retainage still held back. */
export function finalAmount(a: { contractCents: number; billedBeforeCents: number; retainageHeldCents: number; retainageReleasedCents: number }): { balanceCents: number; retainageCents: number } {
  return { balanceCents: a.contractCents - a.billedBeforeCents, retainageCents: a.retainageHeldCents - a.retainageReleasedCents };
}

/** How far a new bill would take the job past its contract (0 when it stays within). */
export function overContract(a: { contractCents: number; billedBeforeCents: number; thisBillCents: number }): number {
  return Math.max(0, a.billedBeforeCents + a.thisBillCents - a.contractCents);
}

/**
 * One contract line, or under "tax on materials only" two: the materials share and the rest,
 * split by the job's estimated cost (allocation sums exactly to the amount).
 */
export function contractLines(a: {
  amountCents: number;
  description: string;
  taxOnMaterials: boolean;
  estimate: { materialCents: number; otherCents: number };
}): LineInput[] {
  const one = (category: LineCategory, cents: number, description: string): LineInput => ({ kind: 'contract', category, description, quantity: 1, unitPriceCents: cents });
  if (!a.taxOnMaterials || a.estimate.materialCents <= 0) return [one('other', a.amountCents, a.description)];
  const [materials, rest] = split(a.amountCents, [a.estimate.materialCents, a.estimate.otherCents]);
  const pct = Math.round((a.estimate.materialCents / (a.estimate.materialCents + a.estimate.otherCents)) * 100);
  return [one('material', materials, `${a.description} — materials (${pct} % by estimate)`), one('labour', rest, `${a.description} — labour and other`)];
}
