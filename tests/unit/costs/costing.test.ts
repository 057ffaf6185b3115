import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { jobCosting, pct } from '../../../src/lib/costs/costing';
import { COST_CATEGORIES } from '../../../src/lib/costs/categories';

describe('job cost against bid', () => {
  it('works a small job through by hand', () => {
    const c = jobCosting({
      estimates: [
        { category: 'material', amountCents: 400000, source: 'bid' },
        { category: 'labour', amountCents: 300000, source: 'bid' },
        { category: 'material', amountCents: 50000, source: 'change_order' },
      ],
      actuals: [
        { category: 'material', amountCents: 430000 },
        { category: 'labour', amountCents: 375000 },
        { category: 'labour', amountCents: -1000 },
        { category: 'permit', amountCents: 12500 },
      ],
      contractCents: 1_000_000,
      changeOrdersCents: 80000,
    });
    const mat = c.categories.find((x) => x.category === 'material')!;
    const lab = c.categories.find((x) => x.category === 'labour')!;
    const permit = c.categories.find((x) => x.category === 'permit')!;
    expect(mat).toMatchObject({ bidCents: 400000, changeOrderCents: 50000, estimatedCents: 450000, actualCents: 430000, varianceCents: -20000, variancePct: -4.44, over: false });
    // 374,000 against 300,000: 24.67 % over, past the 10 % flag
    expect(lab).toMatchObject({ actualCents: 374000, varianceCents: 74000, variancePct: 24.67, over: true });
    expect(permit).toMatchObject({ estimatedCents: 0, actualCents: 12500, variancePct: null, over: true });
    expect(c.totals).toMatchObject({ estimatedCents: 750000, actualCents: 816500, varianceCents: 66500 });
    expect(c.revenueCents).toBe(1_080_000);
    // (10,800.00 − 8,165.00) ÷ 10,800.00 = 24.40 % margin so far; planned (10,800 − 7,500) ÷ 10,800 = 30.56 %
    expect(c.marginSoFarCents).toBe(263500);
    expect(c.marginSoFarPct).toBe(24.4);
    expect(c.plannedMarginPct).toBe(30.56);
  });

  it('has no margin without a contract price', () => {
    const c = jobCosting({ estimates: [], actuals: [], contractCents: null, changeOrdersCents: 0 });
    expect(c.marginSoFarCents).toBeNull();
    expect(c.marginSoFarPct).toBeNull();
    expect(c.categories.map((x) => x.category)).toEqual([...COST_CATEGORIES]);
  });

  it('category rows always add up to the totals (property)', () => {
    const cat = fc.constantFrom(...COST_CATEGORIES);
    const row = fc.record({ category: cat, amountCents: fc.integer({ min: -1e8, max: 1e9 }) });
    fc.assert(fc.property(fc.array(row), fc.array(row), (est, act) => {
      const c = jobCosting({ estimates: est.map((e) => ({ ...e, source: 'bid' })), actuals: act, contractCents: 5e9, changeOrdersCents: 0 });
      const s = (k: 'estimatedCents' | 'actualCents' | 'varianceCents') => c.categories.reduce((a, x) => a + x[k], 0);
      expect(s('estimatedCents')).toBe(c.totals.estimatedCents);
      expect(s('actualCents')).toBe(c.totals.actualCents);
      expect(s('varianceCents')).toBe(c.totals.varianceCents);
      expect(c.marginSoFarCents).toBe(5e9 - c.totals.actualCents);
    }));
  });

  it('rounds percentages half away from zero', () => {
    expect(pct(1, 8)).toBe(12.5);
    expect(pct(-1, 3)).toBe(-33.33);
    expect(pct(5, 0)).toBeNull();
  });
});
