import type { CurrencyCode } from '../format.ts';

/** ISO 4217 minor-unit exponents of the currencies a company may bill in. */
export const MINOR_UNITS: Record<CurrencyCode, number> = { USD: 2, CAD: 2 };

/**
 * Stripe takes integer amounts in the currency's smallest unit. Tallypost keeps hundredths,
 * so a currency with another exponent scales (and one with fewer digits must divide exactly).
 */
export function toStripeAmount(cents: number, currency: CurrencyCode): number {
  const exp = MINOR_UNITS[currency];
  if (exp >= 2) return cents * 10 ** (exp - 2);
  const div = 10 ** (2 - exp);
  if (cents % div !== 0) throw new Error(`${cents} cents is not a whole amount in ${currency}`);
  return cents / div;
}

/** The other way: an amount Stripe reports, in Tallypost's hundredths. */
export function fromStripeAmount(amount: number, currency: CurrencyCode): number {
  const exp = MINOR_UNITS[currency];
  return exp >= 2 ? amount / 10 ** (exp - 2) : amount * 10 ** (2 - exp);
}
