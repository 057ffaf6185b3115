import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { quantileSeq } from 'mathjs';
import * as ss from 'simple-statistics';
import { marginFromMarkup, marginPct, markupFromMargin, markupPct, priceForMargin } from '../../../src/lib/pricing/money';
import { centsPerFoot, jobMargin, pct1, type JobFigures } from '../../../src/lib/margins/job';
import { marginByMonth, marginByStyle } from '../../../src/lib/margins/by-style';
import { bestAndWorst, quarterOf, yearBefore } from '../../../src/lib/margins/dashboard';

const zero = { material: 0, labour: 0, rental: 0, other: 0 };
function job(id: number, over: Partial<JobFigures> = {}): JobFigures {
  return {
    jobId: id, code: `J-${id}`, title: 'Fence', status: 'completed', customerName: 'C', styleId: 1, styleName: 'Wood privacy 6 ft', estimatorUserId: null, estimatorName: null,
    reportDate: '2026-05-10', contractBaseCents: 1_000_000, approvedChangeOrdersCents: 0, estimated: { ...zero, material: 400_000, labour: 280_000 },
    actual: { ...zero, material: 410_000, labour: 350_000 }, billedCents: 1_000_000, collectedCents: 900_000, linearFt: 200, ...over,
  };
}

describe('margin and markup, worked examples', () => {
  it('a 30 % margin is a markup of about 42.86 %, and back ([calc] from g = m ÷ (1 + m))', () => {
    expect(markupFromMargin(30)).toBeCloseTo(42.857142857, 8);
    expect(marginFromMarkup(42.857142857142854)).toBeCloseTo(30, 10);
    expect(markupFromMargin(25)).toBeCloseTo(33.333333, 5);
  });

  it('cost $10,000 at a 35 % margin is a price of $15,384.62, whose margin is 35 % and markup 53.85 % ([calc], REFERENCES.md)', () => {
    const price = priceForMargin(1_000_000, 35);
    expect(price).toBe(1_538_462);
    expect(marginPct(price, 1_000_000)).toBeCloseTo(35, 3);
    expect(markupPct(price, 1_000_000)).toBeCloseTo(53.846, 2);
  });

  it('margin and markup describe the same price (property)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 10_000_000 }), fc.integer({ min: 1, max: 10_000_000 }), (cost, extra) => {
      const price = cost + extra;
      const g = marginPct(price, cost)!;
      const m = markupPct(price, cost)!;
      fc.pre(g < 90);
      expect(marginFromMarkup(m)).toBeCloseTo(g, 6);
      // priceForMargin takes the margin to 10⁻⁴ %: under a 90 % margin the price moves by at most 10⁻⁵ of itself.
      expect(Math.abs(priceForMargin(cost, g) - price)).toBeLessThanOrEqual(1 + price * 1e-5);
    }));
  });
});

describe('a job\'s margin', () => {
  it('contract with change orders, gross profit, margin against the bid\'s, per foot (a hand-worked job)', () => {
    // Contract $10,000 + change order $500 = $10,500. Estimated cost $6,800 + $300 CO = $7,100
    // → planned margin (10,500 − 7,100) ÷ 10,500 = 32.38 % → 32.4. Actual $7,600 + $120 of
    // permits = $7,720 → profit $2,780, margin 26.48 % → 26.5; 5.9 points worse. 200 ft →
    // $13.90 of profit per foot.
    const m = jobMargin(job(1, { approvedChangeOrdersCents: 50_000, estimated: { material: 420_000, labour: 290_000, rental: 0, other: 0 }, actual: { material: 410_000, labour: 350_000, rental: 0, other: 12_000 } }));
    expect(m.contractCents).toBe(1_050_000);
    expect(m.estimatedCostCents).toBe(710_000);
    expect(m.costToDateCents).toBe(772_000);
    expect(m.grossProfitCents).toBe(278_000);
    expect(m.marginPct).toBe(26.5);
    expect(m.estimatedMarginPct).toBe(32.4);
    expect(m.marginDeltaPts).toBe(-5.9);
    expect(m.grossProfitPerFtCents).toBe(1390);
    expect(m.final).toBe(true);
  });

  it('has no margin and no NaN without a contract or a length', () => {
    const m = jobMargin(job(2, { contractBaseCents: null, linearFt: null, status: 'building' }));
    expect(m.contractCents).toBe(0);
    expect(m.marginPct).toBeNull();
    expect(m.estimatedMarginPct).toBeNull();
    expect(m.grossProfitPerFtCents).toBeNull();
    expect(m.final).toBe(false);
    expect(JSON.stringify(m)).not.toMatch(/NaN|Infinity/);
  });

  it('rounds percents and per-foot cents half away from zero', () => {
    expect(pct1(1, 8)).toBe(12.5);
    expect(pct1(1, 16)).toBe(6.3); // 6.25 → 6.3
    expect(pct1(-1, 16)).toBe(-6.3);
    expect(pct1(1, 0)).toBeNull();
    expect(centsPerFoot(5, 2)).toBe(3);
    expect(centsPerFoot(-5, 2)).toBe(-3);
    expect(centsPerFoot(100, 0)).toBeNull();
  });
});

describe('margins by style', () => {
  const jobs = [
    job(1, { styleId: 1, styleName: 'Wood', contractBaseCents: 1_000_000, actual: { ...zero, material: 500_000, labour: 200_000 }, linearFt: 100 }),
    job(2, { styleId: 1, styleName: 'Wood', contractBaseCents: 500_000, actual: { ...zero, material: 300_000, labour: 100_000, rental: 20_000, other: 5_000 }, linearFt: 50 }),
    job(3, { styleId: 2, styleName: 'Chain', contractBaseCents: 300_000, actual: { ...zero, material: 150_000 }, linearFt: null }),
    job(4, { styleId: 1, styleName: 'Wood', contractBaseCents: 800_000, actual: { ...zero, material: 700_000 }, linearFt: 80, reportDate: '2026-07-02' }),
  ].map(jobMargin);

  it('sums each style and the total exactly, per foot over the jobs with a length', () => {
    const r = marginByStyle(jobs);
    expect(r.styles.map((s) => s.styleName)).toEqual(['Chain', 'Wood']);
    const wood = r.styles[1];
    // Revenue 10,000 + 5,000 + 8,000 = $23,000; cost 7,000 + 4,250 + 7,000 = $18,250; profit $4,750 → 20.7 %.
    expect(wood.revenueCents).toBe(2_300_000);
    expect(wood.costCents).toBe(1_825_000);
    expect(wood.grossProfitCents).toBe(475_000);
    expect(wood.marginPct).toBe(20.7);
    // 230 ft: $4,750 ÷ 230 = $20.652… → $20.65; material $15,000 ÷ 230 = $65.217… → $65.22.
    expect(wood.linearFt).toBe(230);
    expect(wood.grossProfitPerFtCents).toBe(2065);
    expect(wood.costPerFt.material).toBe(6522);
    expect(wood.costPerFt.rental).toBe(87);
    // Job margins 30 %, 15 %, 12.5 %: median 15, quartiles (type 7) 13.75 and 22.5.
    expect(wood.spread).toMatchObject({ medianPct: 15, q1Pct: 13.8, q3Pct: 22.5, minPct: 12.5, maxPct: 30 });
    const chain = r.styles[0];
    expect(chain.jobsWithFeet).toBe(0);
    expect(chain.grossProfitPerFtCents).toBeNull();
    expect(r.total.revenueCents).toBe(2_600_000);
    expect(r.total.grossProfitCents).toBe(r.styles.reduce((a, s) => a + s.grossProfitCents, 0));
  });

  it('spreads agree with mathjs (type 7 quantiles) and simple-statistics (median, mean)', () => {
    fc.assert(fc.property(fc.array(fc.record({ c: fc.integer({ min: 1, max: 5_000_000 }), k: fc.integer({ min: 0, max: 6_000_000 }) }), { minLength: 1, maxLength: 25 }), (xs) => {
      const ms = xs.map((x, i) => jobMargin(job(i + 1, { contractBaseCents: x.c, actual: { ...zero, material: x.k } })));
      const s = marginByStyle(ms).styles[0].spread!;
      const margins = ms.map((m) => m.marginPct!);
      const r1 = (v: number) => Math.round(v * 10) / 10;
      expect(Math.abs(s.medianPct - r1(ss.median(margins)))).toBeLessThanOrEqual(0.1 + 1e-6);
      expect(Math.abs(s.q1Pct - r1(Number(quantileSeq(margins, 0.25))))).toBeLessThanOrEqual(0.1 + 1e-6);
      expect(Math.abs(s.q3Pct - r1(Number(quantileSeq(margins, 0.75))))).toBeLessThanOrEqual(0.1 + 1e-6);
      expect(Math.abs(s.meanPct - r1(ss.mean(margins)))).toBeLessThanOrEqual(0.1 + 1e-6);
    }));
  });

  it('style rows always add up to the total (property)', () => {
    fc.assert(fc.property(fc.array(fc.record({ style: fc.integer({ min: 1, max: 4 }), c: fc.integer({ min: 0, max: 9_000_000 }), k: fc.integer({ min: 0, max: 9_000_000 }), ft: fc.option(fc.integer({ min: 1, max: 900 })) }), { maxLength: 40 }), (xs) => {
      const r = marginByStyle(xs.map((x, i) => jobMargin(job(i + 1, { styleId: x.style, styleName: `S${x.style}`, contractBaseCents: x.c, actual: { ...zero, labour: x.k }, linearFt: x.ft }))));
      for (const k of ['revenueCents', 'costCents', 'grossProfitCents', 'jobs', 'jobsWithFeet'] as const) expect(r.styles.reduce((a, s) => a + s[k], 0)).toBe(r.total[k]);
      expect(JSON.stringify(r)).not.toMatch(/NaN|Infinity/);
    }));
  });

  it('fills the months between the first and the last', () => {
    const months = marginByMonth(jobs);
    expect(months.map((x) => x.month)).toEqual(['2026-05', '2026-06', '2026-07']);
    expect(months[1]).toMatchObject({ jobs: 0, revenueCents: 0, marginPct: null });
    expect(months[2].jobs).toBe(1);
  });

  it('names the best and worst style per foot among styles with enough measured jobs', () => {
    const r = marginByStyle([...jobs, jobMargin(job(5, { styleId: 2, styleName: 'Chain', contractBaseCents: 400_000, actual: { ...zero, material: 100_000 }, linearFt: 100 })), jobMargin(job(6, { styleId: 2, styleName: 'Chain', contractBaseCents: 400_000, actual: { ...zero, material: 100_000 }, linearFt: 100 }))]);
    const b = bestAndWorst(r.styles);
    expect(b.best?.styleName).toBe('Chain');
    expect(b.worst?.styleName).toBe('Wood');
    expect(bestAndWorst(r.styles, 4).best).toBeNull();
  });

  it('knows the quarter and the year before', () => {
    expect(quarterOf('2026-05-14')).toEqual({ from: '2026-04-01', to: '2026-06-30', label: 'Q2 2026' });
    expect(quarterOf('2026-12-31')).toEqual({ from: '2026-10-01', to: '2026-12-31', label: 'Q4 2026' });
    expect(quarterOf('2024-02-29').to).toBe('2024-03-31');
    expect(yearBefore('2026-12-02')).toBe('2025-12-03');
  });
});
