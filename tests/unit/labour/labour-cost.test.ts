import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { all, create } from 'mathjs';
import { labourCostCents } from '../../../src/lib/labour/cost';
import { parseTask } from '../../../src/lib/labour/tasks';

// mathjs BigNumber (decimal.js underneath): exact decimal arithmetic, rounding half away from
// zero by default, an independent reference for hours × wage × (1 + burden).
const math = create(all, { number: 'BigNumber', precision: 40 });
function reference(hours: number, wageCents: number, burdenPct: number): number {
  const b = math.bignumber;
  const exact = math.multiply(math.multiply(b(String(hours)), b(wageCents)), math.add(b(1), math.divide(b(String(burdenPct)), b(100))));
  return Number(math.round(exact as never));
}

describe('labour cost', () => {
  it('works the worked examples', () => {
    // $25.50 × 7.5 h × 1.28 = $244.80 [calc]
    expect(labourCostCents({ hours: 7.5, wageCents: 2550, burdenPct: 28 })).toBe(24480);
    // Employer FICA 7.65 % + FUTA 0.6 % = 8.25 % (IRS Publication 15 and Form 940 rates,
    // figures from memory): $20.00 × 8 h × 1.0825 = $173.20
    expect(labourCostCents({ hours: 8, wageCents: 2000, burdenPct: 8.25 })).toBe(17320);
    // $18.33 × 0.25 h × 1.3 = 5.957 25 → $5.96 (half away from zero at the cent)
    expect(labourCostCents({ hours: 0.25, wageCents: 1833, burdenPct: 30 })).toBe(596);
  });

  it('matches exact decimal arithmetic to the cent (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2400 }), fc.integer({ min: 0, max: 50_000 }), fc.integer({ min: 0, max: 2_000_000 }), (h, wage, b) => {
        const hours = h / 100;
        const burden = b / 10_000;
        expect(labourCostCents({ hours, wageCents: wage, burdenPct: burden })).toBe(reference(hours, wage, burden));
      }),
      { numRuns: 500 },
    );
  });

  it('refuses hours finer than a hundredth', () => {
    expect(() => labourCostCents({ hours: 1.005, wageCents: 2000, burdenPct: 0 })).toThrow(/decimals/);
  });

  it('reads task names from timesheets', () => {
    expect(['Dig and set posts', 'posts', 'Gates', 'clean up', 'Travel', 'dig_set_posts', 'knitting'].map(parseTask)).toEqual(['dig_set_posts', 'dig_set_posts', 'gates', 'cleanup', 'travel_other', 'dig_set_posts', null]);
  });
});
