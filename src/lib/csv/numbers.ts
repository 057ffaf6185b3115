import { dinero, multiply, toSnapshot, transformScale, halfAwayFromZero } from 'dinero.js';
import { USD } from 'dinero.js/currencies';

/** The character that separates whole units from the fraction: 1,234.56 or 1.234,56. */
export type DecimalMark = '.' | ',';

/** An exact decimal: value = units ÷ 10^scale. */
export interface Scaled {
  units: number;
  scale: number;
}

export type Parsed<T> = { ok: true; value: T } | { ok: false; reason: string };

const ok = <T>(value: T): Parsed<T> => ({ ok: true, value });
const bad = (reason: string): Parsed<never> => ({ ok: false, reason });

/** Fifteen digits stay exact in a double; amounts past that are refused, not rounded. */
const MAX_DIGITS = 15;
const CURRENCY_PREFIX = /^(?:US\$|CA\$|C\$|USD|CAD|EUR|\$|€|£)\s*/i;
const CURRENCY_SUFFIX = /\s*(?:USD|CAD|EUR|\$|€|£)$/i;
const POINT_GROUPED = /^\d{1,3}(?:,\d{3})+(?:\.\d+)?$/;
const COMMA_GROUPED = /^\d{1,3}(?:[. \u00a0\u202f']\d{3})+(?:,\d+)?$/;

/**
 * A number as people type it in a spreadsheet: digits, optional thousands grouping and a
 * decimal mark. The grouping must be well formed (1,234,567), so "12,50" under a point
 * mark is refused rather than read as 1250.
 */
export function parseDecimal(raw: string, mark: DecimalMark = '.'): Parsed<Scaled> {
  const t = raw.trim();
  let whole: string;
  let frac = '';
  if (mark === '.') {
    if (/^\d+(?:\.\d*)?$|^\.\d+$/.test(t) || POINT_GROUPED.test(t)) {
      [whole, frac = ''] = t.replace(/,/g, '').split('.');
    } else if (COMMA_GROUPED.test(t) || /^\d+,\d{1,2}$/.test(t)) {
      return bad(`"${raw.trim()}" is written with a decimal comma; set the mapping's decimal mark to comma`);
    } else return bad(`"${raw.trim()}" is not a number`);
  } else if (/^\d+(?:,\d*)?$|^,\d+$/.test(t) || COMMA_GROUPED.test(t)) {
    [whole, frac = ''] = t.replace(/[. \u00a0\u202f']/g, '').split(',');
  } else if (POINT_GROUPED.test(t) || /^\d+\.\d{1,2}$/.test(t)) {
    return bad(`"${raw.trim()}" is written with a decimal point; set the mapping's decimal mark to point`);
  } else return bad(`"${raw.trim()}" is not a number`);
  const digits = (whole + frac).replace(/^0+(?=\d)/, '');
  if (digits.length > MAX_DIGITS) return bad(`"${raw.trim()}" has too many digits`);
  return ok({ units: Number(whole + frac || '0'), scale: frac.length });
}

/**
 * Money as supply-house exports write it: 1,234.56, $1,234.56, -12.50, (12.50), 12.50-,
 * 12.50 CR, and 1.234,56 under a comma mark. Parentheses, a minus on either side and CR
 * all mean a credit. Empty text is null.
 */
export function parseMoney(raw: string, mark: DecimalMark = '.'): Parsed<Scaled | null> {
  let t = raw.trim();
  if (!t) return ok(null);
  let negative = 0;
  // Peel credit markers until none is left: ( ), a minus on either side, CR, a currency sign.
  for (let before = ''; before !== t; ) {
    before = t;
    const paren = /^\((.*)\)$/.exec(t);
    if (paren) { negative++; t = paren[1].trim(); }
    if (/\dCR$|\sCR$/i.test(t)) { negative++; t = t.slice(0, -2).trim(); }
    if (/^[-−]/.test(t)) { negative++; t = t.slice(1).trim(); } else if (t.startsWith('+')) t = t.slice(1).trim();
    if (/[-−]$/.test(t)) { negative++; t = t.slice(0, -1).trim(); }
    t = t.replace(CURRENCY_PREFIX, '').replace(CURRENCY_SUFFIX, '');
  }
  if (negative > 1) return bad(`"${raw.trim()}" has more than one minus sign`);
  if (!t) return bad(`"${raw.trim()}" is not an amount`);
  const n = parseDecimal(t, mark);
  if (!n.ok) return bad(n.reason.replace('is not a number', 'is not an amount'));
  return ok({ units: negative ? -n.value.units : n.value.units, scale: n.value.scale });
}

/**
 * Rounding step "cents": an amount with more than two decimals is rounded half away from
 * zero to the cent, once, here (−0.125 → −0.13, as a refund of 0.125 is 0.13 back).
 */
export function toCents(x: Scaled): number {
  if (x.scale <= 2) return x.units * 10 ** (2 - x.scale);
  const d = dinero({ amount: x.units, currency: USD, scale: x.scale });
  return toSnapshot(transformScale(d, 2, halfAwayFromZero)).amount;
}

/**
 * Rounding step "extended amount": quantity × unit price, exact, then rounded half away from
 * zero to the cent once. Null when the product would leave the exact range.
 */
export function extendCents(quantity: Scaled, unitPrice: Scaled): number | null {
  const product = quantity.units * unitPrice.units;
  if (!Number.isSafeInteger(product)) return null;
  const price = dinero({ amount: unitPrice.units, currency: USD, scale: unitPrice.scale });
  const total = multiply(price, { amount: quantity.units, scale: quantity.scale });
  return toSnapshot(transformScale(total, 2, halfAwayFromZero)).amount;
}

/** A scaled decimal as plain text with at most `places` decimals: {12345, 3} → "12.345". */
export function formatScaled(x: Scaled): string {
  const neg = x.units < 0;
  const s = String(Math.abs(x.units)).padStart(x.scale + 1, '0');
  const whole = x.scale ? s.slice(0, -x.scale) : s;
  const frac = x.scale ? s.slice(-x.scale).replace(/0+$/, '') : '';
  return `${neg ? '-' : ''}${whole}${frac ? `.${frac}` : ''}`;
}

export function scaledToNumber(x: Scaled): number {
  return x.units / 10 ** x.scale;
}

/** Canonical units and the ways receipts write them. */
const UNIT_ALIASES: Record<string, string[]> = {
  each: ['ea', 'each', 'pc', 'pcs', 'piece', 'pieces', 'unit', 'units', 'u', 'ct'],
  ft: ['ft', 'foot', 'feet', 'lf', 'lin ft', 'linft', "'", 'ft.'],
  bag: ['bag', 'bags', 'bg', 'bgs', 'sack', 'sacks', 'sk'],
  box: ['box', 'boxes', 'bx'],
  roll: ['roll', 'rolls', 'rl', 'rll'],
  lb: ['lb', 'lbs', 'pound', 'pounds', '#'],
  gal: ['gal', 'gallon', 'gallons'],
  bundle: ['bundle', 'bundles', 'bdl', 'bndl'],
  pair: ['pr', 'pair', 'pairs'],
  kit: ['kit', 'kits'],
  set: ['set', 'sets'],
  panel: ['panel', 'panels', 'pnl'],
  sheet: ['sheet', 'sheets', 'sht'],
  yd3: ['cy', 'cu yd', 'yd3', 'cubic yard', 'cubic yards'],
  ton: ['ton', 'tons', 'tn'],
  hr: ['hr', 'hrs', 'hour', 'hours', 'h'],
  day: ['day', 'days', 'dy'],
};
const UNIT_LOOKUP = new Map(Object.entries(UNIT_ALIASES).flatMap(([unit, aliases]) => [[unit, unit], ...aliases.map((a) => [a, unit] as [string, string])]));

/** "EA" → "each", "LF" → "ft", "Bags" → "bag"; an unknown unit is kept, lower-cased. */
export function normaliseUnit(raw: string | null | undefined): string | null {
  const t = (raw ?? '').trim().toLowerCase().replace(/\s+/g, ' ');
  if (!t) return null;
  return UNIT_LOOKUP.get(t) ?? UNIT_LOOKUP.get(t.replace(/\.$/, '')) ?? t.slice(0, 20);
}

/** Quantities keep at most four decimals (the database column's scale). */
export const QUANTITY_SCALE = 4;

/**
 * A quantity with an optional unit written beside it: "12", "12 ea", "3.5 LF", "10'",
 * "(2) EA" or "-2" for a return. Rounding step "quantity": past four decimals, half away
 * from zero.
 */
export function parseQuantity(raw: string, mark: DecimalMark = '.'): Parsed<{ value: Scaled; unit: string | null } | null> {
  let t = raw.trim();
  if (!t) return ok(null);
  let unit: string | null = null;
  const u = /\s*([A-Za-z][A-Za-z. ]*|'|#)$/.exec(t);
  if (u && u.index > 0) {
    unit = normaliseUnit(u[1]);
    t = t.slice(0, u.index).trim();
  }
  let negative = false;
  const paren = /^\((.*)\)$/.exec(t);
  if (paren) { negative = true; t = paren[1].trim(); }
  if (/^[-−]/.test(t)) { if (negative) return bad(`"${raw.trim()}" has more than one minus sign`); negative = true; t = t.slice(1).trim(); }
  else if (/-$/.test(t)) { negative = true; t = t.slice(0, -1).trim(); }
  const n = parseDecimal(t, mark);
  if (!n.ok) return bad(n.reason.replace('is not a number', 'is not a quantity').replace(`"${t}"`, `"${raw.trim()}"`));
  let value = n.value;
  if (value.scale > QUANTITY_SCALE) {
    const d = dinero({ amount: value.units, currency: USD, scale: value.scale });
    value = { units: toSnapshot(transformScale(d, QUANTITY_SCALE, halfAwayFromZero)).amount, scale: QUANTITY_SCALE };
  }
  return ok({ value: negative ? { units: -value.units, scale: value.scale } : value, unit });
}
