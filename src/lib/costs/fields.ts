import { z } from 'zod';
import { parseMoney, toCents, parseDecimal } from '../csv/numbers.ts';
import { isoDate } from '../csv/dates.ts';

// Field schemas shared by the cost, time and rental forms and their endpoints. Each one's
// output parses again to itself, so the browser can send what it validated.

/** Largest amount one line may carry: $10 billion, far past any fence. */
const MAX_CENTS = 1e12;

/** Money: a number is cents; a string is money as typed ("$1,234.56", "(12.50)"). */
export const centsField = (label = 'amount') =>
  z.union([z.number(), z.string()]).transform((v, ctx) => {
    if (typeof v === 'number') {
      if (!Number.isSafeInteger(v) || Math.abs(v) > MAX_CENTS) { ctx.addIssue({ code: 'custom', message: `Give the ${label} in whole cents.` }); return z.NEVER; }
      return v;
    }
    const p = parseMoney(v);
    if (!p.ok) { ctx.addIssue({ code: 'custom', message: p.reason.replace(/^"/, 'The amount "') }); return z.NEVER; }
    if (p.value === null) { ctx.addIssue({ code: 'custom', message: `Enter the ${label}.` }); return z.NEVER; }
    const c = toCents(p.value);
    if (Math.abs(c) > MAX_CENTS) { ctx.addIssue({ code: 'custom', message: `That ${label} is too large.` }); return z.NEVER; }
    return c;
  });

/** Optional money: empty or null is null. */
export const optionalCents = (label = 'amount') =>
  z.union([z.null(), z.literal(''), z.number(), z.string()]).optional().transform((v, ctx) => {
    if (v === undefined || v === null || (typeof v === 'string' && !v.trim())) return null;
    const r = centsField(label).safeParse(v);
    if (!r.success) { ctx.addIssue({ code: 'custom', message: r.error.issues[0].message }); return z.NEVER; }
    return r.data;
  });

export const nonNegative = (schema: ReturnType<typeof optionalCents>, label: string) =>
  schema.refine((v) => v === null || v >= 0, `The ${label} cannot be negative.`);

export const dateField = z
  .string()
  .trim()
  .refine((v) => /^\d{4}-\d{2}-\d{2}$/.test(v) && isoDate(+v.slice(0, 4), +v.slice(5, 7), +v.slice(8, 10)) !== null, 'Use a date such as 2026-05-14.');

export const optionalDate = z
  .string()
  .trim()
  .nullish()
  .transform((v) => (v ? v : null))
  .refine((v) => v === null || dateField.safeParse(v).success, 'Use a date such as 2026-05-14.');

export const optionalText = (max: number) =>
  z.string().trim().max(max, `At most ${max} characters.`).nullish().transform((v) => (v ? v : null));

export const idField = (message: string) =>
  z.union([z.number(), z.string()]).transform((v) => (v === '' ? NaN : Number(v))).refine((v) => Number.isSafeInteger(v) && v > 0, message);

export const optionalId = (message = 'Choose one from the list.') =>
  z
    .union([z.number(), z.string(), z.null()])
    .optional()
    .transform((v) => (v === undefined || v === null || v === '' ? null : Number(v)))
    .refine((v) => v === null || (Number.isSafeInteger(v) && v > 0), message);

/** Hours to the hundredth, above 0 and at most `max`. */
export const hoursField = (max: number) =>
  z.union([z.number(), z.string()]).transform((v, ctx) => {
    const text = typeof v === 'number' ? String(v) : v.trim();
    const p = parseDecimal(text);
    if (!text || !p.ok) { ctx.addIssue({ code: 'custom', message: 'Enter the hours, e.g. 7.5.' }); return z.NEVER; }
    if (p.value.scale > 2) { ctx.addIssue({ code: 'custom', message: 'Hours take at most two decimals (7.25).' }); return z.NEVER; }
    const h = p.value.units / 10 ** p.value.scale;
    if (h <= 0 || h > max) { ctx.addIssue({ code: 'custom', message: `Hours must be above 0 and at most ${max}.` }); return z.NEVER; }
    return h;
  });

/** A comma-separated list of positive ids in a query string. */
export const idList = z
  .string()
  .optional()
  .transform((v) => (v ? v.split(',').filter(Boolean).map(Number) : []))
  .pipe(z.array(z.number().int().positive()));

export const page = z.coerce.number().int().min(1).max(100000).default(1);
export const pageSize = (max = 200, dflt = 50) => z.coerce.number().int().min(1).max(max).default(dflt);
