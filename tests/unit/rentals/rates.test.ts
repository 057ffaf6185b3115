import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { add, dinero, multiply, toSnapshot } from 'dinero.js';
import { USD } from 'dinero.js/currencies';
import { cheapestPlan, describePlan, MAX_RENTAL_HOURS, rentalCost, rentalHours, wallClockMs, type RentalPlan, type RentalRates } from '../../../src/lib/rentals/rates';
import { rentalInput } from '../../../src/lib/rentals/schema';

// An earth auger at $65 a half day, $90 a day and $360 a week: a week at four day rates, in
// the range rental yards charge (REFERENCES: about $80–250 a day, a week about 3–4 day rates;
// from memory).
const auger: RentalRates = { halfDayCents: 6500, dayCents: 9000, weekCents: 36000 };

describe('rental rate choice', () => {
  it.each([
    [3, 'half day', 6500],
    [5, 'day', 9000],
    [24, 'day', 9000],
    [3 * 24, '3 days', 27000],
    // four days cost as much as the week: the tie goes to the single period
    [4 * 24, 'week', 36000],
    [5 * 24, 'week', 36000],
    [6 * 24, 'week', 36000],
    [7 * 24 + 2, 'week, half day', 42500],
    [8 * 24, 'week, day', 45000],
    [12 * 24, '2 weeks', 72000],
  ])('%i hours costs %s', (hours, plan, cents) => {
    const p = cheapestPlan(hours, auger)!;
    expect(describePlan(p).replace(/^1 /, '').replace(/, 1 /, ', ')).toBe(plan);
    expect(p.rentCents).toBe(cents);
  });

  it('uses only the rates it has', () => {
    expect(cheapestPlan(30, { halfDayCents: null, dayCents: 9000, weekCents: null })).toEqual({ weeks: 0, days: 2, halfDays: 0, rentCents: 18000 });
    expect(cheapestPlan(10 * 24, { halfDayCents: null, dayCents: null, weekCents: 36000 })).toEqual({ weeks: 2, days: 0, halfDays: 0, rentCents: 72000 });
    expect(cheapestPlan(6, { halfDayCents: 6500, dayCents: null, weekCents: null })).toBeNull();
  });

  it('is never beaten by any combination in a wide search, and covers the time (property)', () => {
    const rate = fc.option(fc.integer({ min: 1000, max: 200_000 }), { nil: null });
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 * 24 }), rate, rate, rate, (hours, h, d, w) => {
        const rates = { halfDayCents: h, dayCents: d, weekCents: w };
        const plan = cheapestPlan(hours, rates);
        let best: number | null = null;
        for (let weeks = 0; weeks <= (w === null ? 0 : 8); weeks++) {
          for (let days = 0; days <= (d === null ? 0 : 45); days++) {
            for (let halves = 0; halves <= (h === null ? 0 : 1); halves++) {
              if (weeks * 168 + days * 24 + halves * 4 < hours) continue;
              const cost = weeks * (w ?? 0) + days * (d ?? 0) + halves * (h ?? 0);
              if (best === null || cost < best) best = cost;
            }
          }
        }
        expect(plan?.rentCents ?? null).toBe(best);
        if (plan) expect(plan.weeks * 168 + plan.days * 24 + plan.halfDays * 4).toBeGreaterThanOrEqual(hours);
      }),
      { numRuns: 300 },
    );
  });

  it('never charges less for a longer rental (property)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 600 }), fc.integer({ min: 1, max: 200 }), (a, extra) => {
      expect(cheapestPlan(a + extra, auger)!.rentCents).toBeGreaterThanOrEqual(cheapestPlan(a, auger)!.rentCents);
    }));
  });

  it('adds delivery and fuel, and explains what it cannot price', () => {
    const r = rentalCost({ startAt: '2026-04-06T07:00', endAt: '2026-04-11T07:00', rates: auger, deliveryCents: 4500, fuelCents: 1800 });
    expect(r).toEqual({ ok: true, hours: 120, plan: { weeks: 1, days: 0, halfDays: 0, rentCents: 36000 }, totalCents: 42300 });
    expect(rentalCost({ startAt: '2026-04-06T07:00', endAt: '2026-04-06T07:00', rates: auger, deliveryCents: 0, fuelCents: 0 })).toEqual({ ok: false, reason: 'the end must be after the start' });
    expect(rentalCost({ startAt: '2026-04-06T07:00', endAt: '2026-04-06T09:00', rates: { halfDayCents: null, dayCents: null, weekCents: null }, deliveryCents: 0, fuelCents: 0 }).ok).toBe(false);
    expect(rentalHours('2026-03-07T22:00', '2026-03-08T06:00')).toBe(8);
  });
});

/**
 * The plan search as it was before it became constant-time: every count of weeks up to the
 * weeks that cover the rental, every count of days up to the days that cover what is left,
 * a half day for a last stretch of up to 4 hours; cheapest first, then fewest periods, then
 * the first found. Its time grows with the square of the rental's length, so it is only the
 * reference here.
 */
function searchEveryPlan(hours: number, rates: RentalRates): RentalPlan | null {
  if (!(hours > 0)) return null;
  const usd = (cents: number) => dinero({ amount: cents, currency: USD });
  const price = (p: Omit<RentalPlan, 'rentCents'>) => {
    let total = usd(0);
    if (p.weeks) total = add(total, multiply(usd(rates.weekCents!), p.weeks));
    if (p.days) total = add(total, multiply(usd(rates.dayCents!), p.days));
    if (p.halfDays) total = add(total, multiply(usd(rates.halfDayCents!), p.halfDays));
    return toSnapshot(total).amount;
  };
  const maxWeeks = rates.weekCents !== null ? Math.ceil(hours / 168) : 0;
  let best: RentalPlan | null = null;
  for (let w = 0; w <= maxWeeks; w++) {
    const afterWeeks = Math.max(0, hours - w * 168);
    const maxDays = rates.dayCents !== null && afterWeeks > 0 ? Math.ceil(afterWeeks / 24) : 0;
    for (let d = 0; d <= maxDays; d++) {
      const left = Math.max(0, afterWeeks - d * 24);
      let h = 0;
      if (left > 0) {
        if (rates.halfDayCents === null || left > 4) continue;
        h = 1;
      }
      const plan = { weeks: w, days: d, halfDays: h, rentCents: price({ weeks: w, days: d, halfDays: h }) };
      const count = (p: RentalPlan) => p.weeks + p.days + p.halfDays;
      if (!best || plan.rentCents < best.rentCents || (plan.rentCents === best.rentCents && count(plan) < count(best))) best = plan;
    }
  }
  return best;
}

describe('the plan in constant time', () => {
  // Rates that tie often (a week at exactly 7 days, a half day at a day, free periods) next to any rate at all.
  const rate = fc.option(fc.oneof(fc.constantFrom(0, 6500, 9000, 36000, 63000), fc.integer({ min: 0, max: 500_000 })), { nil: null, freq: 4 });
  // Rentals are timed to the minute; up to four months.
  const hours = fc.integer({ min: 1, max: 120 * 24 * 60 }).map((minutes) => minutes / 60);

  it('chooses the same plan as trying every count of weeks and days, ties included (property)', () => {
    fc.assert(
      fc.property(hours, rate, rate, rate, (h, halfDayCents, dayCents, weekCents) => {
        const rates = { halfDayCents, dayCents, weekCents };
        expect(cheapestPlan(h, rates)).toEqual(searchEveryPlan(h, rates));
      }),
      { numRuns: 2000 },
    );
  });

  it.each([
    // [hours, half day, day, week]
    [1 / 60, 6500, 9000, 36000],
    [4, 6500, 9000, 36000],
    [4 + 1 / 60, 6500, 9000, 36000],
    [28, 6500, 9000, 36000],
    [29, 6500, 9000, 36000],
    [168, 6500, 9000, 36000],
    [168 + 4, null, null, 36000],
    [168 + 4, 6500, null, 36000],
    [3 * 168 + 4, 6500, null, 36000],
    [3 * 168 + 5, 6500, null, 36000],
    // a week at exactly seven days: the same price every way, the fewest periods win
    [20 * 24, 6500, 9000, 63000],
    [20 * 24 + 3, 9000, 9000, 63000],
    // free periods: the fewest of them
    [100, 0, 0, 0],
    [100, 0, 0, null],
    [2000, null, 0, 0],
    // a week dearer than seven days: days only
    [50 * 24 + 2, 6500, 9000, 70000],
    [120 * 24, 6500, 9000, 36000],
    [MAX_RENTAL_HOURS, 6500, 9000, 36000],
    [MAX_RENTAL_HOURS, 100, 9000, 1],
  ] as const)('%s hours at %s / %s / %s is the plan the full search finds', (h, halfDayCents, dayCents, weekCents) => {
    const rates = { halfDayCents, dayCents, weekCents };
    expect(cheapestPlan(h, rates)).toEqual(searchEveryPlan(h, rates));
  });

  it('prices a 366-day rental as 52 weeks and 2 days', () => {
    // 366 days = 52 × 7 + 2; 52 × $360 + 2 × $90 = $18,900, under 53 weeks ($19,080).
    expect(cheapestPlan(366 * 24, auger)).toEqual({ weeks: 52, days: 2, halfDays: 0, rentCents: 1_890_000 });
  });

  it('refuses a rental longer than 366 days, or on a date that does not exist, before pricing it', () => {
    const at = (startAt: string, endAt: string) => rentalCost({ startAt, endAt, rates: auger, deliveryCents: 0, fuelCents: 0 });
    expect(at('2026-01-01T07:00', '2027-01-02T07:00')).toMatchObject({ ok: true, hours: 366 * 24 });
    expect(at('2026-01-01T07:00', '2027-01-02T07:01')).toEqual({ ok: false, reason: 'a rental is at most 366 days; enter a longer one as separate rentals' });
    expect(at('1900-01-01T00:00', '2200-12-31T23:59')).toMatchObject({ ok: false, reason: expect.stringMatching(/at most 366 days/) });
    expect(at('0001-01-01T07:00', '9999-12-31T17:00')).toMatchObject({ ok: false, reason: expect.stringMatching(/real dates and times between 1900 and 2200/) });
    expect(at('2026-02-29T07:00', '2026-03-02T07:00').ok).toBe(false);
    expect(at('2028-02-29T07:00', '2028-03-02T07:00')).toMatchObject({ ok: true, hours: 48 });
  });

  it.each([
    ['2026-05-14T07:30', true],
    ['2026-05-14 07:30:00', true],
    ['2024-02-29T00:00', true],
    ['1900-01-01T00:00', true],
    ['2200-12-31T23:59', true],
    ['1899-12-31T23:59', false],
    ['2201-01-01T00:00', false],
    ['0001-01-01T00:00', false],
    ['9999-12-31T00:00', false],
    ['2026-02-29T07:00', false],
    ['2026-04-31T07:00', false],
    ['2026-13-01T07:00', false],
    ['2026-00-10T07:00', false],
    ['2026-05-00T07:00', false],
    ['2026-05-14T24:00', false],
    ['2026-05-14T07:60', false],
    ['2026-05-14', false],
  ])('%s is a real date and time: %s', (s, real) => {
    expect(Number.isFinite(wallClockMs(s))).toBe(real);
  });
});

describe('the rental schema', () => {
  const body = (startAt: unknown, endAt: unknown) => ({ jobId: 1, kind: 'earth_auger', startAt, endAt });
  const fields = (startAt: unknown, endAt: unknown) => {
    const r = rentalInput.safeParse(body(startAt, endAt));
    return r.success ? {} : Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
  };

  it('names the dates that are not real, or out of the years a rental can be in', () => {
    expect(fields('0001-01-01T07:00', '9999-12-31T17:00')).toEqual({
      startAt: 'Use a real date and time between the years 1900 and 2200, such as 2026-05-14T07:30.',
      endAt: 'Use a real date and time between the years 1900 and 2200, such as 2026-05-14T07:30.',
    });
    expect(Object.keys(fields('2026-02-31T07:00', '2026-03-02T07:00'))).toEqual(['startAt']);
    expect(Object.keys(fields('2026-05-14T07:00', 'x'.repeat(10_000)))).toEqual(['endAt']);
    expect(Object.keys(fields('2026-05-14T07:00', 20260515))).toEqual(['endAt']);
  });

  it('takes a rental of up to 366 days, and names the return of a longer one', () => {
    expect(rentalInput.safeParse(body('2026-01-01T07:00', '2027-01-02T07:00')).success).toBe(true);
    expect(fields('2026-01-01T07:00', '2027-01-02T07:01')).toEqual({ endAt: 'A rental is at most 366 days from pick-up to return; enter a longer one as separate rentals.' });
    expect(fields('1900-01-01T00:00', '2200-12-31T23:59')).toHaveProperty('endAt');
    expect(fields('2026-05-02T07:00', '2026-05-01T07:00')).toEqual({ endAt: 'The return must be after the pick-up.' });
  });
});
