import { describe, expect, it } from 'vitest';
import * as ss from 'simple-statistics';
import { calibrateStyle, rentalDaysFor, type FinishedJob } from '../../../src/lib/calibration/calibrate';
import { unitCostChecks } from '../../../src/lib/calibration/unit-costs';
import { rng } from '../../../src/lib/random';
import { ratesFor } from '../../../src/lib/takeoff/defaults';
import type { Rates } from '../../../src/lib/takeoff/rates';
import { WASTE_KEYS, type WasteKey } from '../../../src/lib/takeoff/recipe';

const zero = { material: 0, labour: 0, rental: 0, other: 0 };
const waste = Object.fromEntries(WASTE_KEYS.map((k) => [k, 10])) as Record<WasteKey, number>;
const rates: Rates = { ...ratesFor('wood_privacy'), hole_hours: 0.15, post_set_hours: 0.05, rails_infill_hours_per_ft: 0.05, gate_hours: 1, setup_hours: 1, crew_size: 2 };

/**
 * A job bid at `rates` with a crew of 2 whose crew-hour costs $80: 10 holes, 100 ft, 1 leaf.
 * Bid crew-hours: posts 10 × 0.20 = 2, rails 100 × 0.05 = 5, gate 1, set-up 1 → 9 crew-h,
 * 18 person-h, $720 of labour. `f` scales the hours the crew logged.
 */
function fj(id: number, f: { posts?: number; rails?: number; gates?: number; setup?: number; concrete?: number; completedOn?: string } = {}): FinishedJob {
  const bid = { posts: 2, rails_infill: 5, gates: 1, setup: 1 };
  const actual = { posts: 2 * (f.posts ?? 1), rails_infill: 5 * (f.rails ?? 1), gates: 1 * (f.gates ?? 1), setup: 1 * (f.setup ?? 1) };
  const labourActual = Math.round((actual.posts + actual.rails_infill + actual.gates + actual.setup) * 8000);
  // Concrete: takeoff $100, the bid's buy list (10 % waste) $110; bought buy list × f.
  const bought = 11_000 * (f.concrete ?? 1);
  const materialActual = 100_000 + Math.round(bought);
  return {
    jobId: id, code: `J-${id}`, title: 'Fence', styleId: 7, styleName: 'Wood', completedOn: f.completedOn ?? '2026-06-01',
    estimatedCostCents: 100_000 + 11_000 + 72_000, actualCostCents: materialActual + labourActual,
    estimated: { ...zero, material: 111_000, labour: 72_000 }, actual: { ...zero, material: materialActual, labour: labourActual },
    crewSize: 2, crewHourCostCents: 8000, holes: 10, fenceFt: 100, gates: 1,
    bidRates: { hole_hours: 0.15, post_set_hours: 0.05, rails_infill_hours_per_ft: 0.05, gate_hours: 1, setup_hours: 1 },
    labour: Object.fromEntries(Object.entries(bid).map(([t, h]) => [t, { bidManHours: h * 2, actualManHours: actual[t as keyof typeof actual] * 2 }])),
    materials: { concrete: { wastePct: 10, takeoffCents: 10_000, buyCents: 11_000, boughtCents: bought }, posts: { wastePct: 10, takeoffCents: 100_000 / 1.1, buyCents: 100_000, boughtCents: 100_000 } },
    rentalDays: { bid: 1, actual: 1 },
  };
}

const style = { styleId: 7, styleName: 'Wood', rates, wastePct: waste };
const today = '2026-12-01';
const item = (c: ReturnType<typeof calibrateStyle>, key: string) => c.items.find((i) => i.key === key)!;

describe('calibrating a style from its finished jobs', () => {
  it('a hand-worked set: crews take 25 % longer on posts than bid', () => {
    const jobs = [1, 2, 3, 4, 5].map((i) => fj(i, { posts: 1.25 }));
    const c = calibrateStyle(jobs, style, new Map(), { today });
    const posts = item(c, 'labour:posts');
    // Bid 0.20 crew-h per hole (0.15 dig + 0.05 set); achieved 2.5 crew-h ÷ 10 holes = 0.25.
    expect(posts.bidMedian).toBe(0.2);
    expect(posts.actualMedian).toBe(0.25);
    expect(posts.ratio!.median).toBeCloseTo(1.25, 12);
    expect(posts.suggested).toBe(0.25);
    // Split in the rates' own proportion: 0.25 × 3/4 and × 1/4.
    expect(posts.suggestedValues).toEqual({ hole_hours: 0.1875, post_set_hours: 0.0625 });
    // Each job: estimated $1,830, actual $1,110 + 9.5 crew-h × $80 = $1,870 → −2.139 %.
    // With 0.25 the re-estimate adds 0.05 × 10 × $80 = $40: exact, so 0 %.
    expect(posts.backtest!.current.mape).toBeCloseTo((40 / 1870) * 100, 6);
    expect(posts.backtest!.current.bias).toBeCloseTo((-40 / 1870) * 100, 6);
    expect(posts.backtest!.suggested).toEqual({ mape: 0, bias: 0 });
    expect(posts.applicable).toBe(true);
    // The other tasks ran as bid: suggestion equals today's rate, nothing to apply.
    expect(item(c, 'labour:rails_infill').suggested).toBe(0.05);
    expect(item(c, 'labour:rails_infill').applicable).toBe(false);
    expect(c.backtest!.suggested.mape).toBe(0);
    expect(c.backtest!.improves).toBe(true);
  });

  it('judges today\'s rates, not the rates each job was bid with', () => {
    // Today's rate is already 0.25 (raised after these bids): nothing left to gain.
    const c = calibrateStyle([1, 2, 3, 4, 5].map((i) => fj(i, { posts: 1.25 })), { ...style, rates: { ...rates, hole_hours: 0.1875, post_set_hours: 0.0625 } }, new Map(), { today });
    const posts = item(c, 'labour:posts');
    expect(posts.current).toBe(0.25);
    expect(posts.backtest!.current.mape).toBe(0);
    expect(posts.applicable).toBe(false);
  });

  it('gives no suggestion from fewer than four jobs, and says why', () => {
    const c = calibrateStyle([1, 2, 3].map((i) => fj(i, { posts: 1.3 })), style, new Map(), { today });
    const posts = item(c, 'labour:posts');
    expect(posts.suggested).toBeNull();
    expect(posts.reason).toMatch(/Only 3 finished jobs.*at least 4/);
    expect(posts.applicable).toBe(false);
  });

  it('suggests from four jobs but backtests only from five (each judged by four others)', () => {
    const posts = item(calibrateStyle([1, 2, 3, 4].map((i) => fj(i, { posts: 1.25 })), style, new Map(), { today }), 'labour:posts');
    expect(posts.suggested).toBe(0.25);
    expect(posts.backtest!.suggested).toBeNull();
    expect(posts.backtestNote).toMatch(/needs 5 jobs; there are 4/);
    expect(posts.applicable).toBe(false);
  });

  it('leaves out a job by hand, for one rate or for all', () => {
    const jobs = [fj(1, { posts: 1.2 }), fj(2, { posts: 1.2 }), fj(3, { posts: 1.2 }), fj(4, { posts: 1.2 }), fj(5, { posts: 4 })];
    const withAll = item(calibrateStyle(jobs, style, new Map(), { today }), 'labour:posts');
    expect(withAll.n).toBe(5);
    expect(withAll.suggested).toBeCloseTo(0.24, 10); // the median shrugs off the 4× job
    const ex = new Map([[5, new Map([['labour:posts', 'Rock ledge on the back run']])]]);
    const c = calibrateStyle(jobs, style, ex, { today });
    const posts = item(c, 'labour:posts');
    expect(posts.n).toBe(4);
    expect(posts.jobs.find((j) => j.jobId === 5)!.excluded).toBe('Rock ledge on the back run');
    expect(item(c, 'labour:rails_infill').n).toBe(5);
    const whole = calibrateStyle(jobs, style, new Map([[5, new Map([['job', 'Half the crew was off']])]]), { today });
    expect(whole.excludedJobs).toBe(1);
    expect(item(whole, 'labour:rails_infill').n).toBe(4);
    expect(whole.backtest!.n).toBe(4);
  });

  it('material waste: bought against the bid\'s own buy list, held at the recipe\'s 50 % limit', () => {
    // Bought 1.5 × the buy list of $110 → achieved (1 + 10 %) × 1.5 − 1 = 65 % over the takeoff.
    const c = calibrateStyle([1, 2, 3, 4, 5].map((i) => fj(i, { concrete: 1.5 })), style, new Map(), { today });
    const conc = item(c, 'waste:concrete');
    expect(conc.actualMedian).toBe(65);
    expect(conc.suggested).toBe(50);
    expect(conc.held).toBe(true);
    expect(conc.suggestedValues).toEqual({ concrete: 50 });
    expect(conc.boughtToTakeoffMedian).toBeCloseTo(1.65, 12);
    expect(conc.applicable).toBe(true);
    // A job that bought exactly its buy list achieved the bid's waste: no suggestion to change.
    const posts = item(c, 'waste:posts');
    expect(posts.suggested).toBe(10);
    expect(posts.applicable).toBe(false);
  });

  it('recovers a known true rate from noisy synthetic jobs within 3 %', () => {
    // True rails rate 0.07 crew-h per ft against a bid of 0.05 (× 1.4), ±10 % noise and a
    // few disasters at 3×; the median must land within 3 % of the truth.
    const r = rng(11);
    const jobs = Array.from({ length: 30 }, (_, i) => fj(i + 1, { rails: 1.4 * (1 + (r.next() - 0.5) * 0.2) * (i % 10 === 3 ? 3 : 1) }));
    const rails = item(calibrateStyle(jobs, style, new Map(), { today }), 'labour:rails_infill');
    expect(Math.abs(rails.suggested! - 0.07) / 0.07).toBeLessThan(0.03);
    expect(rails.backtest!.suggested!.mape).toBeLessThan(rails.backtest!.current.mape);
    // The spread reported is that of the achieved rates, as simple-statistics computes it.
    const achieved = jobs.map((j) => j.labour.rails_infill!.actualManHours / 2 / 100);
    expect(rails.spread!.median).toBeCloseTo(ss.median(achieved), 12);
  });

  it('with a half-life, recent jobs count more', () => {
    const old = [1, 2, 3, 4].map((i) => fj(i, { posts: 1, completedOn: '2024-01-01' }));
    const recent = [5, 6, 7].map((i) => fj(i, { posts: 1.5, completedOn: '2026-11-01' }));
    expect(item(calibrateStyle([...old, ...recent], style, new Map(), { today }), 'labour:posts').suggested).toBe(0.2);
    expect(item(calibrateStyle([...old, ...recent], style, new Map(), { today, halfLifeDays: 180 }), 'labour:posts').suggested).toBe(0.3);
  });

  it('compares by cost category and rental days', () => {
    const c = calibrateStyle([1, 2, 3, 4].map((i) => fj(i, { posts: 1.5 })), style, new Map(), { today });
    // Labour: 10 crew-h × $80 = $800 against $720 → 1.111.
    expect(c.categories.find((x) => x.group === 'labour')!.ratio!.median).toBeCloseTo(800 / 720, 12);
    expect(c.rentals).toMatchObject({ n: 4, bidMedian: 1, actualMedian: 1 });
  });
});

/**
 * fj's job with an auger bid for 12 crew-h of digging at 8 h a rental day (1.5 days: a day and
 * a half day, $200 a day, so $300 bid) and `days` rented, at $200 a day, in its actual cost.
 */
function withAuger(j: FinishedJob, days: number): FinishedJob {
  return {
    ...j, bidRates: { ...j.bidRates, rental_day_hours: 8 },
    estimatedCostCents: j.estimatedCostCents + 30_000, actualCostCents: j.actualCostCents + days * 20_000,
    estimated: { ...j.estimated, rental: 30_000 }, actual: { ...j.actual, rental: days * 20_000 },
    rentalDays: { bid: 1.5, actual: days },
    digRental: { bidDigHours: 12, rules: 1, halfDays: true, bidDaysPerRule: 1.5, bidCostCents: 30_000, actualDays: days },
  };
}

describe('the rental-day rate', () => {
  it('counts rental days the way the takeoff does', () => {
    // A day of 8 h: 12 h → a day and a half day; 13 h → two days; without half days 12 h → two.
    expect(rentalDaysFor(12, 8, true)).toBe(1.5);
    expect(rentalDaysFor(13, 8, true)).toBe(2);
    expect(rentalDaysFor(12, 8, false)).toBe(2);
    expect(rentalDaysFor(16, 8, true)).toBe(2);
    expect(rentalDaysFor(0, 8, true)).toBe(0);
  });

  it('a hand-worked set: the auger stays out two days for 12 hours of digging', () => {
    const c = calibrateStyle([1, 2, 3, 4, 5].map((i) => withAuger(fj(i), 2)), style, new Map(), { today });
    const r = item(c, 'rental:day_hours');
    // The posts ran as bid, so the digging took the bid's 12 h; 12 h ÷ 2 days = 6 h a day.
    expect(r.kind).toBe('rental');
    expect(r.bidMedian).toBe(8);
    expect(r.actualMedian).toBe(6);
    expect(r.ratio!.median).toBeCloseTo(0.75, 12);
    expect(r.current).toBe(8);
    expect(r.suggested).toBe(6);
    expect(r.suggestedValues).toEqual({ rental_day_hours: 6 });
    // Each job: estimated $1,830 + $300 = $2,130, actual $1,830 + $400 = $2,230 → −4.484 %.
    // At 6 h a day the takeoff's 12 h is exactly 2 days, $400: the re-estimate is exact.
    expect(r.backtest!.current.mape).toBeCloseTo((10_000 / 223_000) * 100, 6);
    expect(r.backtest!.current.bias).toBeCloseTo((-10_000 / 223_000) * 100, 6);
    expect(r.backtest!.suggested).toEqual({ mape: 0, bias: 0 });
    expect(r.applicable).toBe(true);
    expect(c.backtest!.suggested.mape).toBe(0);
  });

  it('counts the digging the job took, not the bid\'s, so it pairs with a calibrated dig rate', () => {
    // Posts ran 1.5 × their bid: the digging took 18 h; 2.5 days rented → 7.2 h a day
    // (against the bid's 12 h it would read 4.8).
    const c = calibrateStyle([1, 2, 3, 4, 5].map((i) => withAuger(fj(i, { posts: 1.5 }), 2.5)), style, new Map(), { today });
    expect(item(c, 'rental:day_hours').suggested).toBe(7.2);
  });

  it('leaves out jobs with no dig rental recorded, and has no item without a dig rental bid', () => {
    const jobs = [...[1, 2, 3].map((i) => withAuger(fj(i), 2)), withAuger(fj(4), 0), withAuger(fj(5), 0)];
    const r = item(calibrateStyle(jobs, style, new Map(), { today }), 'rental:day_hours');
    expect(r.n).toBe(3);
    expect(r.suggested).toBeNull();
    expect(r.reason).toMatch(/Only 3 finished jobs.*at least 4/);
    expect(calibrateStyle([1, 2, 3, 4].map((i) => fj(i)), style, new Map(), { today }).items.some((i) => i.key === 'rental:day_hours')).toBe(false);
  });
});

describe('unit costs paid against the bids', () => {
  it('takes each job\'s paid unit cost and the median across jobs', () => {
    const rows = [
      { sku: 'CONC-50', name: 'Concrete', jobId: 1, bidUnitCostCents: 649, paidQty: 10, paidCents: 6_700 },
      { sku: 'CONC-50', name: 'Concrete', jobId: 2, bidUnitCostCents: 649, paidQty: 20, paidCents: 13_000 },
      { sku: 'CONC-50', name: 'Concrete', jobId: 3, bidUnitCostCents: 599, paidQty: 5, paidCents: 3_500 },
      { sku: 'X', name: 'Nothing bought', jobId: 1, bidUnitCostCents: 100, paidQty: 0, paidCents: 0 },
    ];
    const [c] = unitCostChecks(rows, new Map([['CONC-50', 689]]));
    expect(c.jobs).toBe(3);
    expect(c.paidMedianCents).toBe(670); // 670, 650, 700 → 670
    expect(c.bidMedianCents).toBe(649);
    expect(c.ratio.median).toBeCloseTo(670 / 649, 12);
    expect(c.bookCents).toBe(689);
    // Three jobs are too few for a suggested book price.
    expect(c.suggestedCents).toBeNull();
    expect(c.reason).toMatch(/3 finished jobs; at least 4/);
    expect(unitCostChecks(rows, new Map())).toHaveLength(1);
    expect(unitCostChecks(rows, new Map())[0].reason).toBe('Not in the price book.');
  });

  it('suggests a book price from four jobs: the book × the median of paid ÷ book (hand-worked)', () => {
    // Paid per bag 6.70, 6.50, 7.00, 7.20 against a book price of 6.89: the ratios'
    // median is (6.70 + 7.00) ÷ 2 ÷ 6.89, so the suggestion is $6.85.
    const rows = [[10, 6_700], [20, 13_000], [5, 3_500], [10, 7_200]].map(([q, c], i) => ({ sku: 'CONC-50', name: 'Concrete', jobId: i + 1, bidUnitCostCents: 649, paidQty: q, paidCents: c }));
    const [c] = unitCostChecks(rows, new Map([['CONC-50', 689]]));
    expect(c.bookRatio!.median).toBeCloseTo(685 / 689, 12);
    expect(c.bookRatio!.n).toBe(4);
    expect(c.suggestedCents).toBe(685);
    expect(c.reason).toBeNull();
  });
});
