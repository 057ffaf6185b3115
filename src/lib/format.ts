import { dinero, toDecimal, type Dinero } from 'dinero.js';
import { USD, CAD } from 'dinero.js/currencies';

const CURRENCIES = { USD, CAD } as const;
export type CurrencyCode = keyof typeof CURRENCIES;

/** Integer minor units → Dinero in the company's currency. */
export function money(cents: number, currency: CurrencyCode = 'USD'): Dinero<number> {
  if (!Number.isSafeInteger(cents)) throw new Error(`money needs integer cents, got ${cents}`);
  return dinero({ amount: cents, currency: CURRENCIES[currency] });
}

/** Display only: $1,234.56. */
export function formatMoney(cents: number | null | undefined, currency: CurrencyCode = 'USD'): string {
  if (cents === null || cents === undefined) return '—';
  return toDecimal(money(cents, currency), ({ value, currency: c }) => currencyFormat(c.code).format(Number(value)));
}

// Building an Intl formatter costs far more than using one: one per currency, made once.
const currencyFormats = new Map<string, Intl.NumberFormat>();
function currencyFormat(code: string): Intl.NumberFormat {
  let f = currencyFormats.get(code);
  if (!f) currencyFormats.set(code, (f = new Intl.NumberFormat('en-US', { style: 'currency', currency: code })));
  return f;
}
const dateFormat = new Intl.DateTimeFormat('en-US', { year: 'numeric', month: 'short', day: 'numeric', timeZone: 'UTC' });

export function formatDate(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso.length === 10 ? `${iso}T00:00:00Z` : iso);
  return dateFormat.format(d);
}

/** Any zone name the runtime's time-zone database knows (e.g. America/Chicago). */
export function isTimeZone(name: string): boolean {
  if (!name) return false;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

const dateTimeFormats = new Map<string, Intl.DateTimeFormat>();
/** A moment as the company's office reads it: its own time zone, named ("Dec 2, 2026, 2:05 AM CST"); UTC for a zone not known. */
export function formatDateTime(iso: string | Date, timeZone: string): string {
  let f = dateTimeFormats.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', { timeZone: isTimeZone(timeZone) ? timeZone : 'UTC', year: 'numeric', month: 'short', day: 'numeric', hour: 'numeric', minute: '2-digit', timeZoneName: 'short' });
    dateTimeFormats.set(timeZone, f);
  }
  return f.format(typeof iso === 'string' ? new Date(iso) : iso);
}

export function formatPct(value: number | null | undefined, digits = 1): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  return `${value.toFixed(digits)} %`;
}
