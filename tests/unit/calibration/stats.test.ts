import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { quantileSeq } from 'mathjs';
import { mean, median, quantile, spread, weightedMedian } from '../../../src/lib/stats/robust';

const finite = fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true });

describe('robust statistics against general-purpose libraries', () => {
  it('median and mean agree with simple-statistics', () => {
    fc.assert(
      fc.property(fc.array(finite, { minLength: 1, maxLength: 60 }), (xs) => {
        expect(median(xs)).toBeCloseTo(ss.median(xs), 6);
        expect(mean(xs)).toBeCloseTo(ss.mean(xs), 6);
      }),
    );
  });

  it('quantiles agree with mathjs quantileSeq (linear interpolation, type 7)', () => {
    fc.assert(
      // Probabilities in steps of 0.001: mathjs refuses denormal ones such as 1e-300.
      fc.property(fc.array(finite, { minLength: 1, maxLength: 60 }), fc.integer({ min: 0, max: 1000 }), (xs, k) => {
        expect(quantile(xs, k / 1000)).toBeCloseTo(Number(quantileSeq(xs, k / 1000)), 6);
      }),
    );
  });

  it('matches R\'s quantile(1:10) = 1, 3.25, 5.5, 7.75, 10 (R default type 7; values from memory, and they follow from h = (n−1)q)', () => {
    const xs = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    expect([0, 0.25, 0.5, 0.75, 1].map((q) => quantile(xs, q))).toEqual([1, 3.25, 5.5, 7.75, 10]);
    expect(spread(xs)).toMatchObject({ n: 10, median: 5.5, q1: 3.25, q3: 7.75, iqr: 4.5, min: 1, max: 10 });
  });

  it('weighted median: equal weights give the median of an odd list; heavy weight pulls it', () => {
    expect(weightedMedian([1, 2, 3, 4, 100].map((v) => ({ value: v, weight: 1 })))).toBe(3);
    expect(weightedMedian([{ value: 1, weight: 10 }, { value: 2, weight: 1 }, { value: 3, weight: 1 }])).toBe(1);
    expect(weightedMedian([{ value: 1, weight: 1 }, { value: 3, weight: 1 }])).toBe(2);
  });

  it('refuses empty input and non-finite values', () => {
    expect(() => median([])).toThrow();
    expect(() => quantile([1, Number.NaN], 0.5)).toThrow();
  });
});
