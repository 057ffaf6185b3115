import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { backtest, suggestRate, type RateObservation } from '../../../src/lib/calibration/backtest';
import { rng } from '../../../src/lib/random';

function obs(jobId: number, quantity: number, actualHours: number, bidRate: number, extra: Partial<RateObservation> = {}): RateObservation {
  const hourCostCents = 4000;
  const otherCost = 200_000;
  return {
    jobId,
    quantity,
    actualHours,
    ageDays: 30,
    hourCostCents,
    bidRate,
    estimatedCostCents: otherCost + Math.round(bidRate * quantity * hourCostCents),
    actualCostCents: otherCost + Math.round(actualHours * hourCostCents),
    ...extra,
  };
}

describe('suggested rates', () => {
  it('says nothing with too few jobs, and says why', () => {
    const s = suggestRate([obs(1, 100, 20, 0.2), obs(2, 100, 22, 0.2)]);
    expect(s.rate).toBeNull();
    expect(s.n).toBe(2);
    expect(s.reason).toContain('at least 4');
  });

  it('takes the median achieved rate: a hand-worked set of five jobs', () => {
    // Achieved hours per foot: 0.25, 0.24, 0.26, 0.25, 0.60 (the last hit a rock ledge).
    // Sorted: .24 .25 .25 .26 .60 → median .25; q1 .25, q3 .26 (type 7). The mean would be .32.
    const set = [obs(1, 200, 50, 0.2), obs(2, 100, 24, 0.2), obs(3, 150, 39, 0.2), obs(4, 120, 30, 0.2), obs(5, 100, 60, 0.2)];
    const s = suggestRate(set);
    expect(s.rate).toBeCloseTo(0.25, 10);
    expect(s.spread).toMatchObject({ n: 5 });
    expect(s.spread!.q1).toBeCloseTo(0.25, 10);
    expect(s.spread!.q3).toBeCloseTo(0.26, 10);
  });

  it('recovers a known true rate from noisy synthetic jobs within 5 %', () => {
    const r = rng(7);
    const truth = 0.31;
    const set = Array.from({ length: 40 }, (_, i) => {
      const q = r.int(60, 400);
      const noise = 1 + (r.next() - 0.5) * 0.3; // ±15 %
      const outlier = i % 13 === 0 ? 2.5 : 1; // a few jobs that went badly
      return obs(i + 1, q, truth * q * noise * outlier, 0.24);
    });
    const s = suggestRate(set);
    expect(Math.abs(s.rate! - truth) / truth).toBeLessThan(0.05);
  });

  it('weights recent jobs more with a half-life', () => {
    const old = [1, 2, 3, 4].map((i) => obs(i, 100, 20, 0.2, { ageDays: 720 }));
    const recent = [5, 6, 7].map((i) => obs(i, 100, 30, 0.2, { ageDays: 10 }));
    expect(suggestRate([...old, ...recent]).rate).toBeCloseTo(0.2, 10);
    expect(suggestRate([...old, ...recent], { recencyHalfLifeDays: 90 }).rate).toBeCloseTo(0.3, 10);
  });
});

describe('leave-one-out backtest', () => {
  it('a hand-worked case: bids at 0.20 h/ft when crews take 0.25 h/ft', () => {
    const set = [1, 2, 3, 4, 5].map((i) => obs(i, 100, 25, 0.2));
    const b = backtest(set);
    // Each job: estimated 200,000 + 0.20×100×4,000 = 280,000; actual 200,000 + 25×4,000 = 300,000.
    // Current error (280,000 − 300,000)/300,000 = −6.67 % on every job: MAPE 6.67, bias −6.67.
    expect(b.current.mape).toBeCloseTo(6.6667, 3);
    expect(b.current.bias).toBeCloseTo(-6.6667, 3);
    // Fitted without each job, the rate is still 0.25: the re-estimate is exact.
    expect(b.rows.every((r) => r.fittedRate === 0.25 && r.suggestedCostCents === 300_000)).toBe(true);
    expect(b.suggested).toEqual({ mape: 0, bias: 0 });
    expect(b.improves).toBe(true);
  });

  it('never judges a job by a rate fitted with it', () => {
    // One job is wildly slow; with it left out the others fit 0.25, so its own error stays large.
    const set = [...[1, 2, 3, 4].map((i) => obs(i, 100, 25, 0.25)), obs(5, 100, 100, 0.25)];
    const b = backtest(set);
    const slow = b.rows.find((r) => r.jobId === 5)!;
    expect(slow.fittedRate).toBeCloseTo(0.25, 10);
    expect(slow.suggestedCostCents).toBe(300_000);
  });

  it('does not claim an improvement when the bid rate was already right', () => {
    const r = rng(3);
    const set = Array.from({ length: 12 }, (_, i) => obs(i + 1, 100, 25 * (1 + (r.next() - 0.5) * 0.2), 0.25));
    const b = backtest(set);
    expect(b.suggested!.mape).toBeGreaterThan(b.current.mape * 0.8);
  });

  it('has one row per job and MAPE ≥ |bias| always', () => {
    fc.assert(
      fc.property(fc.array(fc.record({ q: fc.integer({ min: 10, max: 500 }), h: fc.double({ min: 1, max: 300, noNaN: true }) }), { minLength: 5, maxLength: 15 }), (xs) => {
        const b = backtest(xs.map((x, i) => obs(i + 1, x.q, x.h, 0.2)));
        expect(b.rows).toHaveLength(xs.length);
        expect(b.current.mape + 1e-9).toBeGreaterThanOrEqual(Math.abs(b.current.bias));
        if (b.suggested) expect(b.suggested.mape + 1e-9).toBeGreaterThanOrEqual(Math.abs(b.suggested.bias));
      }),
    );
  });
});
