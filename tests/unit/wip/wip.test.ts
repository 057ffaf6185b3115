import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { roundHalfEven, wipRow, wipTotals } from '../../../src/lib/wip/wip';

describe('percentage of completion, cost-to-cost', () => {
  it('a worked example: over-billed', () => {
    // The cost-to-cost method as in the AICPA guide for construction contractors (from
    // memory; the numbers follow from its definitions): contract $100,000, estimated total
    // cost $80,000, cost to date $20,000 → 25 % complete, earned $25,000; billed $30,000
    // → $5,000 billed in excess of earnings.
    const r = wipRow({ contractCents: 10_000_000, estimatedTotalCostCents: 8_000_000, costToDateCents: 2_000_000, billedToDateCents: 3_000_000 });
    expect(r.percentComplete).toBe(0.25);
    expect(r.earnedCents).toBe(2_500_000);
    expect(r.overUnderCents).toBe(500_000);
    expect(r.projectedGrossProfitCents).toBe(2_000_000);
    expect(r.projectedMargin).toBe(0.2);
  });

  it('a worked example: under-billed', () => {
    // Contract $12,400, estimate $8,680, cost to date $6,076 → 70 %, earned $8,680, billed
    // $6,200 (a 50 % deposit) → $2,480 of earnings not yet billed. [calc]
    const r = wipRow({ contractCents: 1_240_000, estimatedTotalCostCents: 868_000, costToDateCents: 607_600, billedToDateCents: 620_000 });
    expect(r.percentComplete).toBeCloseTo(0.7, 12);
    expect(r.earnedCents).toBe(868_000);
    expect(r.overUnderCents).toBe(-248_000);
  });

  it('raises an estimate the cost to date has passed to that cost, and flags the job', () => {
    // A job cannot cost less than it has already spent: the current estimate becomes $3,600.
    const r = wipRow({ contractCents: 500_000, estimatedTotalCostCents: 300_000, costToDateCents: 360_000, billedToDateCents: 500_000 });
    expect(r.currentEstimatedCostCents).toBe(360_000);
    expect(r.percentComplete).toBe(1);
    expect(r.overEstimate).toBe(true);
    expect(r.earnedCents).toBe(500_000);
    expect(r.projectedGrossProfitCents).toBe(140_000);
    // Given the revised estimate instead ($4,000), the same job is 90 % done: earned $4,500.
    const revised = wipRow({ contractCents: 500_000, estimatedTotalCostCents: 400_000, costToDateCents: 360_000, billedToDateCents: 500_000 });
    expect(revised.percentComplete).toBeCloseTo(0.9, 12);
    expect(revised.earnedCents).toBe(450_000);
    expect(revised.overUnderCents).toBe(50_000);
    expect(revised.overEstimate).toBe(false);
  });

  it('rounds earned revenue half to even', () => {
    expect(roundHalfEven(2.5)).toBe(2);
    expect(roundHalfEven(3.5)).toBe(4);
    expect(roundHalfEven(-2.5)).toBe(-2);
    // 333 × 1/2 = 166.5 → 166
    expect(wipRow({ contractCents: 333, estimatedTotalCostCents: 200, costToDateCents: 100, billedToDateCents: 0 }).earnedCents).toBe(166);
  });

  it('totals add up to the cent and net over/under equals billed − earned', () => {
    const cents = fc.integer({ min: 0, max: 50_000_000 });
    fc.assert(
      fc.property(fc.array(fc.record({ contractCents: cents, estimatedTotalCostCents: cents, costToDateCents: cents, billedToDateCents: cents }), { maxLength: 30 }), (jobs) => {
        const rows = jobs.map((j) => ({ ...j, ...wipRow(j) }));
        const t = wipTotals(rows);
        expect(t.netOverUnderCents).toBe(t.billedToDateCents - t.earnedCents);
        expect(t.overBilledCents - t.underBilledCents).toBe(t.netOverUnderCents);
        for (const r of rows) {
          expect(r.earnedCents).toBeLessThanOrEqual(r.contractCents);
          expect(r.currentEstimatedCostCents).toBeGreaterThanOrEqual(r.costToDateCents);
        }
      }),
    );
  });

  it('refuses non-integer cents', () => {
    expect(() => wipRow({ contractCents: 10.5, estimatedTotalCostCents: 1, costToDateCents: 0, billedToDateCents: 0 })).toThrow();
  });
});
