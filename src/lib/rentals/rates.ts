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

/** Hours between two wall-clock times 'YYYY-MM-DDTHH:mm' (no time zone: both are local). */
export function rentalHours(startAt: string, endAt: string): number | null {
  const t = (s: string) => {
    const m = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})/.exec(s);
    return m ? Date.UTC(+m[1], +m[2] - 1, +m[3], +m[4], +m[5]) : NaN;
  };
  const a = t(startAt);
  const b = t(endAt);
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
 * The cheapest set of periods that covers the rental: every count of weeks and days that
 * could matter is tried, with a half day for a last stretch of up to 4 hours. Five days at
 * $90 ($450) lose to one week at $360, so the week is chosen. Ties go to fewer periods.
 * Null when the rates given cannot cover the time (only a half-day rate for a whole day).
 */
export function cheapestPlan(hours: number, rates: RentalRates): RentalPlan | null {
  if (!(hours > 0)) return null;
  const { week, day, halfDay } = PERIOD_HOURS;
  const maxWeeks = rates.weekCents !== null ? Math.ceil(hours / week) : 0;
  let best: RentalPlan | null = null;
  for (let w = 0; w <= maxWeeks; w++) {
    const afterWeeks = Math.max(0, hours - w * week);
    const maxDays = rates.dayCents !== null && afterWeeks > 0 ? Math.ceil(afterWeeks / day) : 0;
    for (let d = 0; d <= maxDays; d++) {
      const left = Math.max(0, afterWeeks - d * day);
      let h = 0;
      if (left > 0) {
        if (rates.halfDayCents === null || left > halfDay) continue;
        h = 1;
      }
      const periods = { weeks: w, days: d, halfDays: h };
      const plan = { ...periods, rentCents: price(periods, rates) };
      const count = (p: RentalPlan) => p.weeks + p.days + p.halfDays;
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
  if (hours === null) return { ok: false, reason: 'give the start and end as date and time' };
  if (hours <= 0) return { ok: false, reason: 'the end must be after the start' };
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
