/**
 * Business-day arithmetic on ISO dates (YYYY-MM-DD), in UTC so a date never shifts with
 * the server's zone. Which weekdays count and which holidays are off come from the company.
 */

export interface BusinessCalendar {
  /** 0 = Sunday … 6 = Saturday */
  workdays: readonly number[];
  /** YYYY-MM-DD */
  holidays: readonly string[];
}

export const MON_TO_FRI: BusinessCalendar = { workdays: [1, 2, 3, 4, 5], holidays: [] };

const DAY = 86_400_000;
const toMs = (iso: string) => Date.parse(`${iso}T00:00:00Z`);
const toIso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

export function isBusinessDay(iso: string, cal: BusinessCalendar): boolean {
  return cal.workdays.includes(new Date(toMs(iso)).getUTCDay()) && !cal.holidays.includes(iso);
}

/** The nth business day after iso (n ≥ 0; n = 0 gives iso itself). */
export function addBusinessDays(iso: string, n: number, cal: BusinessCalendar): string {
  if (!cal.workdays.length) throw new Error('a calendar needs at least one workday');
  let ms = toMs(iso);
  let left = n;
  while (left > 0) {
    ms += DAY;
    if (isBusinessDay(toIso(ms), cal)) left--;
  }
  return toIso(ms);
}

export function addCalendarDays(iso: string, n: number): string {
  return toIso(toMs(iso) + n * DAY);
}

/** Whole days from a to b (b − a). */
export function daysBetween(a: string, b: string): number {
  return Math.round((toMs(b) - toMs(a)) / DAY);
}

export const isIsoDate = (v: string): boolean => /^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(toMs(v)) && toIso(toMs(v)) === v;
