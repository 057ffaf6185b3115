import { add, allocate, halfAwayFromZero, multiply, toSnapshot, transformScale, type Dinero } from 'dinero.js';
import { money, type CurrencyCode } from '../format.ts';

/** Integer minor units out of a Dinero already at scale 2. */
export function toCents(d: Dinero<number>): number {
  return toSnapshot(transformScale(d, 2, halfAwayFromZero)).amount;
}

/**
 * amount × pct / 100, rounded once to the cent, half away from zero (so −$4.125 → −$4.13 and
 * $4.125 → $4.13). Percentages carry at most four decimals (DECIMAL(7,4)), so the rate is
 * exact as a scaled integer.
 */
export function percentOf(amountCents: number, pct: number, currency: CurrencyCode = 'USD'): number {
  const rate = { amount: Math.round(pct * 10_000), scale: 6 };
  return toCents(multiply(money(amountCents, currency), rate));
}

/** quantity × unit price, rounded once to the cent (half away from zero); quantity to 0.001. */
export function extend(quantity: number, unitCents: number, currency: CurrencyCode = 'USD'): number {
  return toCents(multiply(money(unitCents, currency), { amount: Math.round(quantity * 1000), scale: 3 }));
}

export function sum(values: number[], currency: CurrencyCode = 'USD'): number {
  return toSnapshot(values.reduce((acc, v) => add(acc, money(v, currency)), money(0, currency))).amount;
}

/** Splits an amount by ratios so the parts sum exactly to it (dinero's allocate). */
export function split(amountCents: number, ratios: number[], currency: CurrencyCode = 'USD'): number[] {
  if (ratios.every((r) => r <= 0)) return ratios.map((_, i) => (i === 0 ? amountCents : 0));
  return allocate(money(amountCents, currency), ratios.map((r) => Math.max(0, Math.round(r)))).map((d) => toSnapshot(d).amount);
}

/**
 * "1,234.56", "$80", "-12.5" → cents, read from the digits (no floating point). Null when
 * it is not an amount.
 */
export function parseMoney(text: string): number | null {
  const t = text.trim().replace(/[$,\s]/g, '');
  const m = /^(-?)(\d{1,13})(?:\.(\d{0,2}))?$/.exec(t);
  if (!m) return null;
  const cents = Number(m[2]) * 100 + Number((m[3] ?? '').padEnd(2, '0') || '0');
  return m[1] ? -cents : cents;
}

/** Cents → "1234.56" for an input field. */
export function centsToInput(cents: number): string {
  const neg = cents < 0 ? '-' : '';
  const a = Math.abs(cents);
  return `${neg}${Math.floor(a / 100)}.${String(a % 100).padStart(2, '0')}`;
}
