import { add, dinero, halfAwayFromZero, multiply, toSnapshot, transformScale, type Dinero } from 'dinero.js';
import { USD } from 'dinero.js/currencies';

/**
 * Money steps for pricing. Amounts are integer cents; each function names its rounding:
 * half away from zero, to the cent, once at the step that needs it.
 */

const SCALE = 6;
/** A decimal factor (hours, a percentage as a fraction) as a scaled integer for dinero. */
function scaled(x: number): { amount: number; scale: number } {
  if (!Number.isFinite(x)) throw new Error(`not a finite factor: ${x}`);
  return { amount: Math.round(x * 10 ** SCALE), scale: SCALE };
}

const d = (cents: number): Dinero<number> => {
  if (!Number.isSafeInteger(cents)) throw new Error(`money needs integer cents, got ${cents}`);
  return dinero({ amount: cents, currency: USD });
};
const cents = (x: Dinero<number>): number => {
  const s = toSnapshot(transformScale(x, 2, halfAwayFromZero));
  return s.amount;
};

/** cents × factor₁ × factor₂ …, rounded half away from zero to the cent once at the end. */
export function mulCents(amountCents: number, ...factors: number[]): number {
  const f = scaled(factors.reduce((a, b) => a * b, 1));
  if (!Number.isSafeInteger(amountCents * f.amount)) throw new Error('amount too large to multiply exactly');
  return cents(multiply(d(amountCents), f));
}

export function sumCents(values: readonly number[]): number {
  return cents(values.reduce((a, v) => add(a, d(v)), d(0)));
}

/**
 * Price for a target gross margin g: P = C ÷ (1 − g), in exact integer arithmetic,
 * rounded half up to the cent (the one rounding of this step).
 */
export function priceForMargin(costCents: number, marginPct: number): number {
  if (marginPct >= 100) throw new Error('a margin must be under 100 %');
  const g = BigInt(Math.round(marginPct * 10_000)); // percent × 10⁴ → parts per million
  const denom = 1_000_000n - g;
  const num = BigInt(costCents) * 1_000_000n;
  const q = (2n * num + denom) / (2n * denom);
  return Number(q);
}

/** Price for a markup m: P = C × (1 + m), half away from zero to the cent. */
export function priceForMarkup(costCents: number, markupPct: number): number {
  return mulCents(costCents, 1 + markupPct / 100);
}

/** Bid rounding: to the nearest multiple of the company's step (500 = $5), halves up. */
export function roundToStep(cents: number, stepCents: number): number {
  if (stepCents <= 1) return cents;
  return Math.floor((cents + stepCents / 2) / stepCents) * stepCents;
}

/** Gross margin g = (P − C) ÷ P, percent; null when there is no price. */
export function marginPct(priceCents: number, costCents: number): number | null {
  return priceCents > 0 ? ((priceCents - costCents) / priceCents) * 100 : null;
}

/** Markup m = (P − C) ÷ C, percent; null when there is no cost. */
export function markupPct(priceCents: number, costCents: number): number | null {
  return costCents > 0 ? ((priceCents - costCents) / costCents) * 100 : null;
}

/** m = g ÷ (1 − g) and g = m ÷ (1 + m), both in percent. */
export const markupFromMargin = (g: number): number => (g / (100 - g)) * 100;
export const marginFromMarkup = (m: number): number => (m / (100 + m)) * 100;
