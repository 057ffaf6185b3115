import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { cheapestPlan, describePlan, rentalCost, rentalHours, type RentalRates } from '../../../src/lib/rentals/rates';

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
