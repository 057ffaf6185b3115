import { allocate, dinero, toSnapshot } from 'dinero.js';
import { USD } from 'dinero.js/currencies';

export type SplitResult = { ok: true; parts: number[] } | { ok: false; reason: string };

/** Percent shares carry at most this many decimals (12.3456 %). */
export const PERCENT_SCALE = 4;

/**
 * Rounding step "split": a line split by percentages is divided with dinero's allocate:
 * each part gets its share truncated to the cent, and the leftover cents go one by one to
 * the parts with the largest percentages, so the parts add up to the line exactly, credits
 * included.
 */
export function splitByPercent(totalCents: number, percents: number[]): SplitResult {
  if (!Number.isSafeInteger(totalCents)) return { ok: false, reason: 'the line amount is not whole cents' };
  if (percents.length === 0) return { ok: false, reason: 'give at least one part' };
  const ratios = percents.map((p) => Math.round(p * 10 ** PERCENT_SCALE));
  if (ratios.some((r, i) => r <= 0 || Math.abs(r - percents[i] * 10 ** PERCENT_SCALE) > 1e-6)) {
    return { ok: false, reason: `each part needs a percentage above 0 with at most ${PERCENT_SCALE} decimals` };
  }
  const sum = ratios.reduce((a, b) => a + b, 0);
  if (sum !== 100 * 10 ** PERCENT_SCALE) return { ok: false, reason: `the percentages add up to ${sum / 10 ** PERCENT_SCALE} %, not 100 %` };
  const parts = allocate(dinero({ amount: totalCents, currency: USD }), ratios).map((d) => toSnapshot(d).amount);
  return { ok: true, parts };
}

/** Parts given in cents must add up to the line exactly; nothing is adjusted silently. */
export function splitByAmount(totalCents: number, amounts: number[]): SplitResult {
  if (amounts.length === 0) return { ok: false, reason: 'give at least one part' };
  if (amounts.some((a) => !Number.isSafeInteger(a))) return { ok: false, reason: 'amounts must be whole cents' };
  if (amounts.some((a) => a === 0)) return { ok: false, reason: 'a part of 0.00 allocates nothing; remove it' };
  const sum = amounts.reduce((a, b) => a + b, 0);
  if (sum !== totalCents) return { ok: false, reason: `the parts add up to ${fmt(sum)}, the line is ${fmt(totalCents)}` };
  return { ok: true, parts: amounts };
}

/** n equal parts that sum exactly (the first parts take the leftover cents). */
export function splitEvenly(totalCents: number, n: number): number[] {
  return allocate(dinero({ amount: totalCents, currency: USD }), Array.from({ length: n }, () => 1)).map((d) => toSnapshot(d).amount);
}

function fmt(cents: number): string {
  const sign = cents < 0 ? '-' : '';
  const a = Math.abs(cents);
  return `${sign}${Math.floor(a / 100)}.${String(a % 100).padStart(2, '0')}`;
}
