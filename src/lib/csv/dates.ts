import type { Parsed } from './numbers.ts';

/** How a column writes its dates; the mapping names one. */
export const DATE_FORMATS = ['iso', 'mdy', 'dmy', 'ymd'] as const;
export type DateFormat = (typeof DATE_FORMATS)[number];

export const DATE_FORMAT_LABELS: Record<DateFormat, string> = {
  iso: 'ISO 2026-03-14',
  mdy: 'US month/day/year 3/14/2026',
  dmy: 'Day/month/year 14/03/2026 or 14.03.2026',
  ymd: 'Year/month/day 2026/03/14',
};

const FORMAT_NAMES: Record<DateFormat, string> = { iso: 'ISO year-month-day', mdy: 'US month/day/year', dmy: 'day/month/year', ymd: 'year/month/day' };

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

function isLeap(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

/**
 * Two-digit years follow POSIX strptime's %y: 69–99 are 1969–1999 and 00–68 are 2000–2068
 * (The Open Group Base Specifications, strptime).
 */
export function expandYear(y: string): number {
  const n = Number(y);
  if (y.length !== 2) return n;
  return n >= 69 ? 1900 + n : 2000 + n;
}

export function isoDate(y: number, m: number, d: number): string | null {
  if (!Number.isInteger(y) || y < 1900 || y > 2199) return null;
  if (!Number.isInteger(m) || m < 1 || m > 12) return null;
  const max = m === 2 && isLeap(y) ? 29 : MONTH_DAYS[m - 1];
  if (!Number.isInteger(d) || d < 1 || d > max) return null;
  return `${y}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
}

const PATTERNS: Record<DateFormat, RegExp> = {
  iso: /^(\d{4})-(\d{1,2})-(\d{1,2})(?:[T ][\d:.]+(?:Z|[+-]\d{2}:?\d{2})?)?$/,
  mdy: /^(\d{1,2})[/.-](\d{1,2})[/.-](\d{4}|\d{2})(?:\s+[\d:]+(?:\s*[AP]M)?)?$/i,
  dmy: /^(\d{1,2})[/.-](\d{1,2})[/.-](\d{4}|\d{2})(?:\s+[\d:]+)?$/,
  ymd: /^(\d{4})[/.](\d{1,2})[/.](\d{1,2})$/,
};

/** A date in the named format → 'YYYY-MM-DD', refusing dates that do not exist (2/30). */
export function parseDate(raw: string, format: DateFormat): Parsed<string | null> {
  const t = raw.trim();
  if (!t) return { ok: true, value: null };
  const m = PATTERNS[format].exec(t);
  let out: string | null = null;
  if (m) {
    if (format === 'iso' || format === 'ymd') out = isoDate(Number(m[1]), Number(m[2]), Number(m[3]));
    else if (format === 'mdy') out = isoDate(expandYear(m[3]), Number(m[1]), Number(m[2]));
    else out = isoDate(expandYear(m[3]), Number(m[2]), Number(m[1]));
  }
  if (out) return { ok: true, value: out };
  return { ok: false, reason: `"${t}" is not a ${FORMAT_NAMES[format]} date` };
}

/** The format most consistent with sample values, for a first guess the bookkeeper confirms. */
export function guessDateFormat(samples: string[]): DateFormat {
  const values = samples.map((s) => s.trim()).filter(Boolean);
  const fits = (f: DateFormat) => values.filter((v) => parseDate(v, f).ok).length;
  let best: DateFormat = 'iso';
  for (const f of ['iso', 'mdy', 'dmy', 'ymd'] as const) if (fits(f) > fits(best)) best = f;
  return best;
}
