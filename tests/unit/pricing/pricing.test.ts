import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { marginFromMarkup, marginPct, markupFromMargin, markupPct, mulCents, priceForMargin, priceForMarkup, roundToStep } from '../../../src/lib/pricing/money';
import { priceTakeoff, type PriceItem, type PricingSettings } from '../../../src/lib/pricing/price';
import { computeTakeoff, type Takeoff } from '../../../src/lib/takeoff/takeoff';
import { recipeFor, ratesFor } from '../../../src/lib/takeoff/defaults';
import { recipeSkus } from '../../../src/lib/takeoff/recipe';
import { layoutInput, NO_SITE_RULES } from '../../../src/lib/takeoff/input';
import { COST_CATEGORIES } from '../../../src/lib/costs/categories';

describe('margin and markup (by arithmetic from the definitions g = (P − C)/P, m = (P − C)/C)', () => {
  it('25 % margin is 33.33 % markup; 30 % margin is about 42.86 % markup', () => {
    expect(markupFromMargin(25)).toBeCloseTo(33.3333, 4);
    expect(markupFromMargin(30)).toBeCloseTo(42.857, 3);
    expect(marginFromMarkup(50)).toBeCloseTo(33.3333, 4);
  });

  it('cost $10,000 at a 35 % margin prices at $15,384.62', () => {
    expect(priceForMargin(1_000_000, 35)).toBe(1_538_462);
  });

  it('g = m / (1 + m) and m = g / (1 − g) hold for any price above cost', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 10_000_000 }), fc.integer({ min: 1, max: 10_000_000 }), (c, extra) => {
      const p = c + extra;
      const g = marginPct(p, c)!;
      const m = markupPct(p, c)!;
      // Relative error: near a 100 % margin, 1 − g cancels and floating point loses digits.
      expect(marginFromMarkup(m) / g).toBeCloseTo(1, 6);
      expect(markupFromMargin(g) / m).toBeCloseTo(1, 6);
    }));
  });

  it('price ÷ cost matches the stated margin to the cent', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: 50_000_000 }), fc.integer({ min: 0, max: 900_000 }), (cost, g4) => {
      const g = g4 / 10_000; // percent with four places
      const p = priceForMargin(cost, g);
      // Exact: |P − C/(1 − g)| ≤ ½ cent, in integers: |2P(1 − g) − 2C| ≤ (1 − g).
      const oneMinus = 1_000_000n - BigInt(g4);
      const lhs = 2n * BigInt(p) * oneMinus - 2n * BigInt(cost) * 1_000_000n;
      expect(lhs <= oneMinus && lhs >= -oneMinus).toBe(true);
    }));
  });

  it('markup prices half away from zero to the cent, bid rounding to the step', () => {
    expect(priceForMarkup(1001, 50)).toBe(1502); // 1501.5 → 1502
    expect(roundToStep(432_140, 500)).toBe(432_000);
    expect(roundToStep(432_250, 500)).toBe(432_500);
    expect(roundToStep(432_149, 1)).toBe(432_149);
    expect(mulCents(2800, 1.28)).toBe(3584);
  });
});

const settings: PricingSettings = { labourBurdenPct: 28, taxMode: 'materials', taxRatePct: 7.375, bidRoundingCents: 500 };
function takeoff(): Takeoff {
  const t = computeTakeoff(layoutInput.parse({ runs: [{ lengthFt: 40, heightIn: 72 }, { lengthFt: 30, heightIn: 72, connectsToPrevious: true }], gates: [{ runIndex: 1, widthFt: 4 }] }), recipeFor('wood_privacy'), ratesFor('wood_privacy'), NO_SITE_RULES);
  if (!t.ok) throw new Error('takeoff failed');
  return t;
}
function fullBook(): Map<string, PriceItem> {
  const r = recipeFor('wood_privacy');
  return new Map(recipeSkus(r).map((s, i) => [s.sku, { itemId: i + 1, sku: s.sku, name: s.label, unit: 'each', category: s.sku.startsWith('RENT') ? 'rental' : 'material', unitCostCents: 500 + i * 137, supplierName: 'Yard', lastSeenOn: '2026-11-01' } as PriceItem]));
}

describe('pricing a takeoff', () => {
  it('says on a stock length bought only for spares why it is bought', () => {
    // 80 ft with a 4 ft gate: thirty 7 ft 7¼ in rails fill fifteen 16 ft boards exactly; the
    // three spare rails (10 % waste) take one more 16 ft board and one 8 ft board.
    const t = computeTakeoff(layoutInput.parse({ runs: [{ lengthFt: 80, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4 }] }), recipeFor('wood_privacy'), ratesFor('wood_privacy'), NO_SITE_RULES);
    if (!t.ok) throw new Error('takeoff failed');
    const p = priceTakeoff(t, fullBook(), ratesFor('wood_privacy'), settings, { mode: 'margin', pct: 32, includeTax: true });
    const rails = p.lines.filter((l) => l.kind === 'material' && /rail/.test(l.description));
    const sparesOnly = rails.filter((l) => l.takeoffQty === 0);
    expect(sparesOnly.length).toBeGreaterThan(0);
    for (const l of sparesOnly) expect(l.detail).toMatch(/^\d+ more for waste: \d+ spare pieces of .+ over all .+ lengths$/);
    // Lines the takeoff needs as they are carry no such word.
    for (const l of rails.filter((x) => x.qty === x.takeoffQty)) expect(l.detail).toBeUndefined();
  });

  it('sums the lines by category and prices to the target margin, then the bid rounding, then tax on materials', () => {
    const p = priceTakeoff(takeoff(), fullBook(), ratesFor('wood_privacy'), settings, { mode: 'margin', pct: 32, includeTax: true }, [{ category: 'permit', description: 'Fence permit', amountCents: 7500 }]);
    expect(p.warnings).toEqual([]);
    const sum = p.lines.reduce((a, l) => a + l.amountCents, 0);
    expect(p.costCents).toBe(sum);
    expect(COST_CATEGORIES.reduce((a, c) => a + p.costByCategory[c], 0)).toBe(sum);
    expect(p.costByCategory.permit).toBe(7500);
    expect(p.exactPriceCents).toBe(priceForMargin(p.costCents, 32));
    expect(p.priceCents % 500).toBe(0);
    expect(Math.abs(p.priceCents - p.exactPriceCents)).toBeLessThanOrEqual(250);
    expect(p.taxableCents).toBe(p.costByCategory.material);
    expect(p.taxCents).toBe(Math.round(p.costByCategory.material * 0.07375));
    expect(p.totalCents).toBe(p.priceCents + p.taxCents);
    const labour = p.lines.filter((l) => l.category === 'labour');
    expect(labour.every((l) => l.unitCostCents === 3584)).toBe(true);
  });

  it('warns of a missing price instead of pricing it at NaN', () => {
    const book = fullBook();
    book.delete('PT-4X4-10');
    const p = priceTakeoff(takeoff(), book, ratesFor('wood_privacy'), settings, { mode: 'margin', pct: 30, includeTax: false });
    expect(p.warnings).toContain('No price for 4×4 treated post 10 ft (PT-4X4-10) in the price book.');
    const line = p.lines.find((l) => l.sku === 'PT-4X4-10')!;
    expect(line.priced).toBe(false);
    expect(line.amountCents).toBe(0);
    expect(Number.isFinite(p.priceCents)).toBe(true);
    expect(p.taxCents).toBe(0);
  });

  it('keeps a hand override with the original beside it', () => {
    const p = priceTakeoff(takeoff(), fullBook(), ratesFor('wood_privacy'), settings, { mode: 'markup', pct: 40, includeTax: true }, [], [{ key: 'material:CONC-50', qty: 60, unitCostCents: null, note: 'bags left from the last job' }]);
    const line = p.lines.find((l) => l.key === 'material:CONC-50')!;
    expect(line.overridden).toBe(true);
    expect(line.qty).toBe(60);
    expect(line.original!.qty).toBe(takeoff().materials.find((m) => m.sku === 'CONC-50')!.buyQty);
    expect(line.amountCents).toBe(60 * line.unitCostCents);
    expect(line.note).toBe('bags left from the last job');
    expect(p.exactPriceCents).toBe(priceForMarkup(p.costCents, 40));
  });
});
