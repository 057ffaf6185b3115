import { add, dinero, multiply, toSnapshot, type Dinero } from 'dinero.js';
import { USD } from 'dinero.js/currencies';

/** Equipment a fence crew rents, in the trade's words. */
export const EQUIPMENT_KINDS = ['earth_auger', 'skid_steer', 'post_driver', 'concrete_mixer', 'trailer', 'mini_excavator', 'plate_compactor', 'generator', 'other'] as const;
export type EquipmentKind = (typeof EQUIPMENT_KINDS)[number];

export const EQUIPMENT_LABELS: Record<EquipmentKind, string> = {
  earth_auger: 'Earth auger',
  skid_steer: 'Skid steer with auger',
  post_driver: 'Post driver',
  concrete_mixer: 'Concrete mixer',
  trailer: 'Trailer',
  mini_excavator: 'Mini excavator',
  plate_compactor: 'Plate compactor',
  generator: 'Generator',
  other: 'Other equipment',
};

/**
 * Rental periods as rental yards usually bill them (common practice, no source): a half day
 * is up to 4 hours and is billed at most once per rental, a day is 24 hours from pick-up,
 * a week is 7 days.
 */
export const PERIOD_HOURS = { halfDay: 4, day: 24, week: 168 } as const;

export interface RentalRates {
  halfDayCents: number | null;
  dayCents: number | null;
  weekCents: number | null;
}

export interface RentalPlan {
  weeks: number;
  days: number;
  halfDays: number;
  /** cents for the periods, before delivery and fuel */
  rentCents: number;
}

/**
 * The longest rental priced as one: a year (366 days, a leap year's). Yards rent equipment
 * by the month and longer, but a fence job that keeps a machine more than a year is entered
 * as several rentals (common practice, no source). It also bounds every count and total.
 */
export const MAX_RENTAL_DAYS = 366;
export const MAX_RENTAL_HOURS = MAX_RENTAL_DAYS * PERIOD_HOURS.day;
/** Years a rental's pick-up and return may fall in. */
export const RENTAL_YEARS = { min: 1900, max: 2200 } as const;

/**
 * Milliseconds of a wall-clock time 'YYYY-MM-DDTHH:mm' (or with a space; anything after the
 * minutes is ignored) counted as if it were UTC, or NaN unless it is a real calendar date
 * (no 31 February) and time (00:00–23:59) in RENTAL_YEARS.
 */
export function wallClockMs(s: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})/.exec(s);
  if (!m) return NaN;
  const [year, month, day, hour, minute] = m.slice(1).map(Number);
  if (year < RENTAL_YEARS.min || year > RENTAL_YEARS.max || hour > 23 || minute > 59) return NaN;
  const ms = Date.UTC(year, month - 1, day, hour, minute);
  const d = new Date(ms);
  return d.getUTCMonth() === month - 1 && d.getUTCDate() === day ? ms : NaN;
}

/** Hours between two wall-clock times 'YYYY-MM-DDTHH:mm' (no time zone: both are local); null unless both are real (wallClockMs). */
export function rentalHours(startAt: string, endAt: string): number | null {
  const a = wallClockMs(startAt);
  const b = wallClockMs(endAt);
  if (!Number.isFinite(a) || !Number.isFinite(b)) return null;
  return (b - a) / 3_600_000;
}

const usd = (cents: number): Dinero<number> => dinero({ amount: cents, currency: USD });

function price(plan: Omit<RentalPlan, 'rentCents'>, rates: RentalRates): number {
  let total = usd(0);
  if (plan.weeks) total = add(total, multiply(usd(rates.weekCents!), plan.weeks));
  if (plan.days) total = add(total, multiply(usd(rates.dayCents!), plan.days));
  if (plan.halfDays) total = add(total, multiply(usd(rates.halfDayCents!), plan.halfDays));
  return toSnapshot(total).amount;
}

/**
 * The cheapest set of periods that covers the rental, with a half day for a last stretch of
 * up to 4 hours. Five days at $90 ($450) lose to one week at $360, so the week is chosen.
 * Ties go to fewer periods, then to fewer weeks and days. Null when the rates given cannot
 * cover the time (only a half-day rate for a whole day).
 *
 * In constant time whatever the hours, over at most six plans. For a count of weeks that
 * leaves time over, the rest is covered by the days that cover it, or by one day fewer and a
 * half day when the last day's part is up to 4 hours; fewer days leave more than a day
 * uncovered. One week more leaves exactly 7 days less over, with the same last part, so each
 * of those two ways costs (week rate − 7 × day rate) more per week, from no weeks up to one
 * week short of covering it all: a straight line, cheapest at an end (or, level, fewest
 * periods at the upper end). The weeks that cover it all are the only other count worth
 * trying. Every hour count a rental has (whole minutes) gives the same plan as trying every
 * count of weeks and days (tests/unit/rentals/rates.test.ts keeps that search).
 */
export function cheapestPlan(hours: number, rates: RentalRates): RentalPlan | null {
  if (!(hours > 0) || !Number.isFinite(hours)) return null;
  const { week, day, halfDay } = PERIOD_HOURS;
  const maxWeeks = rates.weekCents !== null ? Math.ceil(hours / week) : 0;
  const weekCounts = [...new Set([0, maxWeeks - 1, maxWeeks])].filter((w) => w >= 0).sort((a, b) => a - b);
  const count = (p: RentalPlan) => p.weeks + p.days + p.halfDays;
  let best: RentalPlan | null = null;
  for (const w of weekCounts) {
    const afterWeeks = Math.max(0, hours - w * week);
    const maxDays = rates.dayCents !== null && afterWeeks > 0 ? Math.ceil(afterWeeks / day) : 0;
    for (const d of maxDays > 0 ? [maxDays - 1, maxDays] : [0]) {
      const left = Math.max(0, afterWeeks - d * day);
      let h = 0;
      if (left > 0) {
        if (rates.halfDayCents === null || left > halfDay) continue;
        h = 1;
      }
      const periods = { weeks: w, days: d, halfDays: h };
      const plan = { ...periods, rentCents: price(periods, rates) };
      if (!best || plan.rentCents < best.rentCents || (plan.rentCents === best.rentCents && count(plan) < count(best))) best = plan;
    }
  }
  return best;
}

export interface RentalCostInput {
  startAt: string;
  endAt: string;
  rates: RentalRates;
  /** cents */
  deliveryCents: number;
  /** cents */
  fuelCents: number;
}

export type RentalCost =
  | { ok: true; hours: number; plan: RentalPlan; totalCents: number }
  | { ok: false; reason: string };

export function rentalCost(input: RentalCostInput): RentalCost {
  const hours = rentalHours(input.startAt, input.endAt);
  if (hours === null) return { ok: false, reason: `give the start and end as real dates and times between ${RENTAL_YEARS.min} and ${RENTAL_YEARS.max}` };
  if (hours <= 0) return { ok: false, reason: 'the end must be after the start' };
  if (hours > MAX_RENTAL_HOURS) return { ok: false, reason: `a rental is at most ${MAX_RENTAL_DAYS} days; enter a longer one as separate rentals` };
  const { halfDayCents, dayCents, weekCents } = input.rates;
  if (halfDayCents === null && dayCents === null && weekCents === null) return { ok: false, reason: 'give at least one rate (half day, day or week)' };
  const plan = cheapestPlan(hours, input.rates);
  if (!plan) return { ok: false, reason: `a half-day rate alone cannot cover ${Math.round(hours * 10) / 10} hours; add a day or week rate` };
  const totalCents = toSnapshot(add(add(usd(plan.rentCents), usd(input.deliveryCents)), usd(input.fuelCents))).amount;
  return { ok: true, hours, plan, totalCents };
}

/** "1 week, 2 days" for the rental's line. */
export function describePlan(p: RentalPlan): string {
  const part = (n: number, one: string, many: string) => (n ? `${n} ${n === 1 ? one : many}` : null);
  return [part(p.weeks, 'week', 'weeks'), part(p.days, 'day', 'days'), part(p.halfDays, 'half day', 'half days')].filter(Boolean).join(', ');
}
