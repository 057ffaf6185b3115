import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { splitByAmount, splitByPercent, splitEvenly } from '../../../src/lib/allocation/split';

const sum = (xs: number[]) => xs.reduce((a, b) => a + b, 0);

/** Percent vectors with four decimals that add to exactly 100. */
const percents = fc.array(fc.integer({ min: 1, max: 1_000_000 }), { minLength: 1, maxLength: 8 }).map((w) => {
  const total = sum(w);
  const scaled = w.map((x) => Math.max(1, Math.floor((x / total) * 1_000_000)));
  scaled[0] += 1_000_000 - sum(scaled);
  return scaled[0] > 0 ? scaled.map((x) => x / 10_000) : null;
}).filter((p): p is number[] => p !== null);

describe('splitting a line', () => {
  it('by percent: the parts always sum to the line, credits included (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: -10_000_000_00, max: 10_000_000_00 }), percents, (total, p) => {
        const r = splitByPercent(total, p);
        expect(r.ok).toBe(true);
        if (!r.ok) return;
        expect(sum(r.parts)).toBe(total);
        // Each part is within one cent of its exact share. The leftover cents go to the largest
        // shares first (dinero's allocate), so a share that came out exact can take one: at
        // most one cent over, never more (e.g. 8,414,598.00 split 6.6667 / 60 / 33.3333 %).
        r.parts.forEach((part, i) => expect(Math.abs(part - (total * p[i]) / 100)).toBeLessThanOrEqual(1));
      }),
      { numRuns: 500 },
    );
  });

  it('by percent: the counterexample the property once found, where the leftover cent lands on an exact share', () => {
    const r = splitByPercent(841_459_800, [6.6667, 60, 33.3333]);
    expect(r).toEqual({ ok: true, parts: [56_097_600, 504_875_881, 280_486_319] });
  });

  it('by percent: a worked example, $100.00 in thirds (the leftover cent goes to the largest share)', () => {
    expect(splitByPercent(10000, [33.3333, 33.3333, 33.3334])).toEqual({ ok: true, parts: [3333, 3333, 3334] });
    expect(splitByPercent(-1001, [50, 50])).toEqual({ ok: true, parts: [-501, -500] });
  });

  it('refuses percentages that do not make 100, or parts of zero', () => {
    expect(splitByPercent(1000, [50, 40])).toEqual({ ok: false, reason: 'the percentages add up to 90 %, not 100 %' });
    expect(splitByPercent(1000, [100, 0]).ok).toBe(false);
    expect(splitByPercent(1000, [33.33333, 66.66667]).ok).toBe(false);
  });

  it('by amount: parts must add up exactly, nothing is adjusted silently', () => {
    expect(splitByAmount(10000, [6000, 4000])).toEqual({ ok: true, parts: [6000, 4000] });
    expect(splitByAmount(10000, [6000, 3999])).toEqual({ ok: false, reason: 'the parts add up to 99.99, the line is 100.00' });
    expect(splitByAmount(-2580, [-2000, -580]).ok).toBe(true);
  });

  it('evenly: n parts that sum exactly (property)', () => {
    fc.assert(fc.property(fc.integer({ min: -1e9, max: 1e9 }), fc.integer({ min: 1, max: 20 }), (total, n) => {
      const parts = splitEvenly(total, n);
      expect(parts).toHaveLength(n);
      expect(sum(parts)).toBe(total);
      expect(Math.max(...parts) - Math.min(...parts)).toBeLessThanOrEqual(1);
    }));
  });
});
