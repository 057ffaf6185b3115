import { backtest, suggestRate, summarise, MIN_JOBS, type ErrorSummary, type RateObservation, type SuggestOptions } from './backtest.ts';
import { median, spread, type Spread } from '../stats/robust.ts';
import { LABOUR_TASKS, LABOUR_TASK_LABELS, RATE_INFO, type LabourTask, type RateKind, type Rates } from '../takeoff/rates.ts';
import { WASTE_KEYS, type WasteKey } from '../takeoff/recipe.ts';
import { COST_GROUPS, type ByGroup, type CostGroup } from '../margins/job.ts';

/**
 * Calibration of a style's bid rates against its finished jobs. Each labour task and each
 * material group is one item: what the bids allowed, what the jobs took, a suggested value
 * (the median the jobs achieved, see backtest.ts), and a leave-one-out backtest of the bids'
 * cost error with today's values and with the suggested ones. Pure: the jobs come in as data.
 */

export interface FinishedJob {
  jobId: number;
  code: string;
  title: string;
  styleId: number;
  styleName: string;
  /** YYYY-MM-DD */
  completedOn: string;
  /** Bid plus approved change orders, and what the job cost, cents. */
  estimatedCostCents: number;
  actualCostCents: number;
  estimated: ByGroup;
  actual: ByGroup;
  /** The accepted bid's crew size, and what it priced one crew-hour at (labour cost ÷ crew-hours), cents. */
  crewSize: number;
  crewHourCostCents: number;
  holes: number;
  /** feet of fence, gate openings excluded (what rails and infill are priced on) */
  fenceFt: number;
  /** gates, a double gate counted once (gate labour is priced per gate) */
  gates: number;
  /** The rate values the bid was priced with. */
  bidRates: Partial<Rates>;
  /** Person-hours by the bid's labour task: priced, and logged by the crews. */
  labour: Partial<Record<LabourTask, { bidManHours: number; actualManHours: number }>>;
  /** Materials by waste group, valued at the bid's unit costs, cents: the takeoff, the bid's buy list, and what was bought. */
  materials: Partial<Record<WasteKey, { wastePct: number; takeoffCents: number; buyCents: number; boughtCents: number }>>;
  /** Rental days: as bid, and as rented. */
  rentalDays: { bid: number; actual: number };
  /**
   * The equipment that digs the holes, for the rental-day rate: the bid's digging crew-hours
   * (holes × its dig rate, what its rental rules cover), how many rental rules the recipe has,
   * whether they rent half days, the days each rule was bid for and what the bid's rental
   * lines cost; and the days of digging equipment the job rented. Null without a dig rental bid.
   */
  digRental?: { bidDigHours: number; rules: number; halfDays: boolean; bidDaysPerRule: number; bidCostCents: number; actualDays: number } | null;
}

/** 'job' leaves the whole job out; an item key leaves it out of that item only. */
export type Exclusions = ReadonlyMap<number, ReadonlyMap<string, string>>;

export interface CalibrationOptions {
  /** Half-life of a job's weight in days; none counts every job alike (the default). */
  halfLifeDays?: number;
  minJobs?: number;
  today: string;
}

export const WASTE_LABELS: Record<WasteKey, string> = {
  posts: 'Posts', rails: 'Rails', infill: 'Infill', cap: 'Cap boards', concrete: 'Concrete', gravel: 'Gravel', hardware: 'Hardware', gates: 'Gates',
};

/** The rates each labour task is priced with, and what its hours are counted per. */
export const TASK_RATES: Record<LabourTask, { kinds: RateKind[]; per: string; quantity: (j: FinishedJob) => number }> = {
  posts: { kinds: ['hole_hours', 'post_set_hours'], per: 'hole', quantity: (j) => j.holes },
  rails_infill: { kinds: ['rails_infill_hours_per_ft'], per: 'ft of fence', quantity: (j) => j.fenceFt },
  gates: { kinds: ['gate_hours'], per: 'gate', quantity: (j) => j.gates },
  setup: { kinds: ['setup_hours'], per: 'job', quantity: () => 1 },
};

/** Most a recipe takes for a waste percent (the recipe schema's limit). */
export const WASTE_MAX_PCT = 50;
/**
 * A suggestion closer than this to today's value, relative, is not worth a new version:
 * 2 % of a labour rate, 1 % of (1 + waste), about one point of waste, 3 % of the rental days
 * an hour of digging takes (a quarter hour of an 8-hour rental day).
 */
export const MIN_CHANGE = { labour: 0.02, waste: 0.01, rental: 0.03 } as const;

/** Equipment that digs or drives the holes: the rentals a recipe's dig rules stand for. */
export const DIG_EQUIPMENT = ['earth_auger', 'skid_steer', 'post_driver', 'mini_excavator'] as const;

/**
 * Rental days for some hours of digging, as the takeoff counts them (lib/takeoff/takeoff.ts):
 * whole days of `dayHours`, the rest rounded up to a half day when the rule rents half days
 * and the rest fits in one, else to a whole day.
 */
export function rentalDaysFor(digHours: number, dayHours: number, halfDays: boolean): number {
  if (!(digHours > 0) || !(dayHours > 0)) return 0;
  const EPS = 1e-6;
  let full = Math.floor(digHours / dayHours + EPS);
  const rest = digHours - full * dayHours;
  let half = 0;
  if (rest > EPS) {
    if (halfDays && rest <= dayHours / 2 + EPS) half = 1;
    else full += 1;
  }
  return full + half / 2;
}

export interface ItemJob {
  jobId: number;
  code: string;
  /** The job's own measure: holes, feet, gates, 1 job; materials: the takeoff at bid prices, cents. */
  quantity: number;
  /** Bid and actual in the item's unit (crew-h per unit; for materials bought ÷ takeoff). */
  bid: number;
  actual: number;
  /** actual ÷ bid */
  ratio: number | null;
  /** Materials: bought ÷ the takeoff before waste, at the bid's unit costs. */
  boughtToTakeoff: number | null;
  excluded: string | null;
  fittedRate: number | null;
  actualCostCents: number;
  currentCostCents: number | null;
  suggestedCostCents: number | null;
}

export interface ItemBacktest {
  n: number;
  current: ErrorSummary;
  suggested: ErrorSummary | null;
  improves: boolean;
}

/** What an item is: its key, words and the rates (or waste group) behind it. */
interface ItemIdentity {
  key: string;
  kind: 'labour' | 'waste' | 'rental';
  label: string;
  unit: string;
  rateKinds: RateKind[];
  wasteKey: WasteKey | null;
}

export interface CalibrationItem extends ItemIdentity {
  /** Today's value in the item's unit: crew-h per unit, a waste percent, or hours of digging per rental day. */
  current: number;
  /** Today's value of each rate or waste key behind it. */
  currentValues: Record<string, number>;
  n: number;
  bidMedian: number | null;
  actualMedian: number | null;
  /** actual ÷ bid across the jobs */
  ratio: Spread | null;
  /** Materials: bought ÷ takeoff before waste, median across the jobs. */
  boughtToTakeoffMedian: number | null;
  /** The suggested value in the item's unit, null when there is none (see reason). */
  suggested: number | null;
  suggestedValues: Record<string, number> | null;
  /** The suggestion met a limit of the recipe and stops there. */
  held: boolean;
  reason: string | null;
  spread: Spread | null;
  backtest: ItemBacktest | null;
  /** Why there is a suggestion but no backtest of it (each job must be judged by enough others). */
  backtestNote: string | null;
  /** The backtest improves and the change is big enough to be a new version. */
  applicable: boolean;
  jobs: ItemJob[];
}

export interface StyleBacktest {
  n: number;
  current: ErrorSummary;
  suggested: ErrorSummary;
  improves: boolean;
  rows: { jobId: number; code: string; actualCostCents: number; currentCostCents: number; suggestedCostCents: number }[];
}

export interface StyleCalibration {
  styleId: number;
  styleName: string;
  jobs: number;
  excludedJobs: number;
  items: CalibrationItem[];
  /** All applicable suggestions together against today's values, job by job. */
  backtest: StyleBacktest | null;
  categories: { group: CostGroup; n: number; ratio: Spread | null }[];
  rentals: { n: number; bidMedian: number | null; actualMedian: number | null; ratio: Spread | null };
}

const DAY = 86_400_000;
const ageDays = (from: string, to: string) => Math.max(0, Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY));
const spreadOf = (xs: number[]) => (xs.length ? spread(xs) : null);
const medianOf = (xs: number[]) => (xs.length ? median(xs) : null);
const round = (x: number, d: number) => (Math.sign(x) * Math.round(Math.abs(x) * 10 ** d)) / 10 ** d;

interface Draft extends ItemIdentity {
  /** current in the lib's rate unit (crew-h per unit, or 1 + waste) */
  currentRate: number;
  currentValues: Record<string, number>;
  opts: SuggestOptions;
  obs: (RateObservation & { code: string; excluded: string | null; boughtToTakeoff?: number })[];
  /** lib rate → the item's display unit */
  show: (rate: number) => number;
  /** The display unit is the inverse of the lib's (hours per day against days per hour): actual ÷ bid is taken in the display unit. */
  inverse?: boolean;
  values: (rate: number) => Record<string, number>;
}

function excludedFor(ex: Exclusions, jobId: number, key: string): string | null {
  const m = ex.get(jobId);
  return m?.get('job') ?? m?.get(key) ?? null;
}

function labourDrafts(jobs: FinishedJob[], current: Rates, ex: Exclusions, base: SuggestOptions, today: string): Draft[] {
  return LABOUR_TASKS.map((task) => {
    const { kinds, per, quantity } = TASK_RATES[task];
    const key = `labour:${task}`;
    const currentRate = kinds.reduce((a, k) => a + current[k], 0);
    const obs = jobs.flatMap((j) => {
      const l = j.labour[task];
      const q = quantity(j);
      if (!l || !(q > 0) || !(j.crewSize > 0) || !(l.bidManHours > 0)) return [];
      const bidRate = kinds.every((k) => j.bidRates[k] !== undefined) ? kinds.reduce((a, k) => a + j.bidRates[k]!, 0) : l.bidManHours / j.crewSize / q;
      return [{
        jobId: j.jobId, code: j.code, quantity: q, actualHours: l.actualManHours / j.crewSize, ageDays: ageDays(j.completedOn, today),
        hourCostCents: j.crewHourCostCents, estimatedCostCents: j.estimatedCostCents, actualCostCents: j.actualCostCents, bidRate, currentRate,
        excluded: excludedFor(ex, j.jobId, key),
      }];
    });
    const max = kinds.reduce((a, k) => a + RATE_INFO[k].max, 0);
    return {
      key, kind: 'labour' as const, label: LABOUR_TASK_LABELS[task], unit: `crew-h per ${per}`, rateKinds: kinds, wasteKey: null, currentRate,
      currentValues: Object.fromEntries(kinds.map((k) => [k, current[k]])), opts: { ...base, bounds: { min: 0, max }, decimals: 4 }, obs,
      show: (r: number) => round(r, 4),
      // A task priced by two rates (dig, then set) keeps their proportion; the rounding
      // step "rate" is four decimals, as labour_rate_versions stores them.
      values: (r: number) => Object.fromEntries(kinds.map((k) => [k, round(currentRate > 0 ? (current[k] * r) / currentRate : r / kinds.length, 4)])),
    };
  });
}

function wasteDrafts(jobs: FinishedJob[], currentWaste: Record<WasteKey, number>, ex: Exclusions, base: SuggestOptions, today: string): Draft[] {
  return WASTE_KEYS.filter((w) => jobs.some((j) => j.materials[w])).map((w) => {
    const key = `waste:${w}`;
    const currentRate = 1 + currentWaste[w] / 100;
    // Bought against the bid's own buy list, scaled back to the takeoff: a job that bought
    // exactly the buy list achieved the bid's waste, so whole rolls and boxes are not waste.
    const obs = jobs.flatMap((j) => {
      const m = j.materials[w];
      if (!m || !(m.buyCents > 0) || !(m.boughtCents > 0)) return [];
      const bidRate = 1 + m.wastePct / 100;
      return [{
        jobId: j.jobId, code: j.code, quantity: m.buyCents / bidRate, actualHours: m.boughtCents, ageDays: ageDays(j.completedOn, today), hourCostCents: 1,
        estimatedCostCents: j.estimatedCostCents, actualCostCents: j.actualCostCents, bidRate, currentRate, excluded: excludedFor(ex, j.jobId, key),
        boughtToTakeoff: m.takeoffCents > 0 ? m.boughtCents / m.takeoffCents : undefined,
      }];
    });
    return {
      key, kind: 'waste' as const, label: `${WASTE_LABELS[w]} waste`, unit: '% over the takeoff', rateKinds: [], wasteKey: w, currentRate,
      currentValues: { [w]: currentWaste[w] }, opts: { ...base, bounds: { min: 1, max: 1 + WASTE_MAX_PCT / 100 }, decimals: 3 }, obs,
      show: (r: number) => round((r - 1) * 100, 1),
      values: (r: number) => ({ [w]: round((r - 1) * 100, 1) }),
    };
  });
}

/**
 * The rental-day rate (rental_day_hours): how many hours of digging one rental day of the
 * auger covers. A job's achieved value is the digging it actually took ÷ the days of digging
 * equipment it rented. The digging it took is not logged apart from setting posts, so it is
 * the bid's digging hours scaled by how far the posts task (dig and set) ran over or under
 * its bid; that way a new bid, whose digging hours come from a calibrated dig rate, divides
 * them by a day of the same kind. Jobs with no dig rental recorded are not counted (the
 * rental may simply not have been entered). The item works in rental days per hour of
 * digging (the inverse), so the median and the re-pricing stay in one unit; the backtest
 * re-prices each job's rental lines at the days the takeoff would round to, per rule, at the
 * bid's own average price per rental day, with its digging hours as bid.
 */
function rentalDraft(jobs: FinishedJob[], current: Rates, ex: Exclusions, base: SuggestOptions, today: string): Draft[] {
  if (!jobs.some((j) => j.digRental)) return [];
  const key = 'rental:day_hours';
  const currentRate = 1 / current.rental_day_hours;
  const obs = jobs.flatMap((j) => {
    const d = j.digRental;
    const posts = j.labour.posts;
    const bidDayHours = j.bidRates.rental_day_hours;
    if (!d || !posts || !(posts.bidManHours > 0) || !(posts.actualManHours > 0) || !(d.bidDigHours > 0) || !(d.rules > 0) || !(d.bidDaysPerRule > 0) || !(d.actualDays > 0) || !(bidDayHours && bidDayHours > 0)) return [];
    const dugHours = d.bidDigHours * (posts.actualManHours / posts.bidManHours);
    const perRuleDay = d.bidCostCents / (d.bidDaysPerRule * d.rules);
    // Rounding step "rental cost": rule-days × the bid's average price of a day, to the cent, half away from zero.
    const costAt = (r: number) => {
      const v = d.rules * rentalDaysFor(d.bidDigHours, 1 / r, d.halfDays) * perRuleDay;
      return Math.sign(v) * Math.round(Math.abs(v));
    };
    return [{
      jobId: j.jobId, code: j.code, quantity: dugHours, actualHours: d.actualDays / d.rules, ageDays: ageDays(j.completedOn, today), hourCostCents: perRuleDay * d.rules,
      estimatedCostCents: j.estimatedCostCents, actualCostCents: j.actualCostCents, bidRate: 1 / bidDayHours, currentRate, costAt,
      excluded: excludedFor(ex, j.jobId, key),
    }];
  });
  const info = RATE_INFO.rental_day_hours;
  const hours = (r: number) => round(1 / r, 1);
  return [{
    key, kind: 'rental' as const, label: 'Hours of digging a rental day covers', unit: 'h of digging per rental day', rateKinds: ['rental_day_hours'], wasteKey: null, currentRate,
    currentValues: { rental_day_hours: current.rental_day_hours },
    // A rental day of 1 to 24 hours (the rate's own limits), as days per hour.
    opts: { ...base, bounds: { min: 1 / info.max, max: 1 / info.min } }, obs,
    show: hours,
    inverse: true,
    // Rounding step "suggested rate": a tenth of an hour, as the rate is entered.
    values: (r: number) => ({ rental_day_hours: hours(r) }),
  }];
}

function finishItem(d: Draft, minJobs: number): CalibrationItem {
  const used = d.obs.filter((o) => !o.excluded);
  const s = suggestRate(used, d.opts);
  const free = suggestRate(used, { ...d.opts, bounds: undefined });
  const bt = used.length ? backtest(used, d.opts) : null;
  const rows = new Map(bt?.rows.map((r) => [r.jobId, r]) ?? []);
  const held = s.rate !== null && free.rate !== null && d.show(free.rate) !== d.show(s.rate);
  const change = s.rate === null ? 0 : Math.abs(s.rate - d.currentRate) / (d.currentRate || 1);
  const achieved = (o: RateObservation) => o.actualHours / o.quantity;
  const vsBid = (o: RateObservation) => (d.inverse ? o.bidRate / achieved(o) : achieved(o) / o.bidRate);
  const raw = used.map((o) => o.boughtToTakeoff).filter((x): x is number => x !== undefined);
  return {
    key: d.key, kind: d.kind, label: d.label, unit: d.unit, rateKinds: d.rateKinds, wasteKey: d.wasteKey,
    current: d.show(d.currentRate), currentValues: d.currentValues, n: used.length,
    bidMedian: used.length ? d.show(median(used.map((o) => o.bidRate))) : null,
    actualMedian: used.length ? d.show(median(used.map(achieved))) : null,
    ratio: spreadOf(used.filter((o) => !d.inverse || achieved(o) > 0).map(vsBid)),
    boughtToTakeoffMedian: medianOf(raw),
    suggested: s.rate === null ? null : d.show(s.rate), suggestedValues: s.rate === null ? null : d.values(s.rate), held,
    reason: s.rate === null ? s.reason ?? null : null, spread: s.spread,
    backtest: bt ? { n: bt.n, current: bt.current, suggested: bt.suggested, improves: bt.improves } : null,
    backtestNote: s.rate !== null && bt && bt.suggested === null ? `The backtest judges each job by a rate fitted on the others, so it needs ${minJobs + 1} jobs; there are ${used.length}.` : null,
    applicable: Boolean(bt?.improves) && change >= MIN_CHANGE[d.kind] - 1e-12 && used.length >= minJobs,
    jobs: d.obs.map((o) => {
      const r = rows.get(o.jobId);
      return {
        jobId: o.jobId, code: o.code, quantity: o.quantity, bid: d.show(o.bidRate), actual: d.show(achieved(o)), ratio: o.bidRate > 0 && (!d.inverse || achieved(o) > 0) ? vsBid(o) : null,
        boughtToTakeoff: o.boughtToTakeoff ?? null, excluded: o.excluded, fittedRate: r?.fittedRate === null || r === undefined ? null : d.show(r.fittedRate),
        actualCostCents: o.actualCostCents, currentCostCents: r?.currentCostCents ?? null, suggestedCostCents: r?.suggestedCostCents ?? null,
      };
    }),
  };
}

/** Every applicable suggestion at once against today's values: each job judged without itself. */
function styleBacktest(jobs: FinishedJob[], items: CalibrationItem[], ex: Exclusions): StyleBacktest | null {
  const used = jobs.filter((j) => !ex.get(j.jobId)?.has('job'));
  if (!used.length) return null;
  const rows = used.map((j) => {
    let current = j.estimatedCostCents;
    let suggested = j.estimatedCostCents;
    for (const it of items) {
      const r = it.jobs.find((x) => x.jobId === j.jobId && !x.excluded);
      if (!r || r.currentCostCents === null) continue;
      current += r.currentCostCents - j.estimatedCostCents;
      suggested += (it.applicable && r.suggestedCostCents !== null ? r.suggestedCostCents : r.currentCostCents) - j.estimatedCostCents;
    }
    return { jobId: j.jobId, code: j.code, actualCostCents: j.actualCostCents, currentCostCents: current, suggestedCostCents: suggested };
  });
  const cur = summarise(rows.map((r) => ({ estimate: r.currentCostCents, actual: r.actualCostCents })));
  const sug = summarise(rows.map((r) => ({ estimate: r.suggestedCostCents, actual: r.actualCostCents })));
  return { n: rows.length, current: cur, suggested: sug, improves: sug.mape < cur.mape, rows };
}

export function calibrateStyle(
  jobs: readonly FinishedJob[],
  current: { styleId: number; styleName: string; rates: Rates; wastePct: Record<WasteKey, number> },
  ex: Exclusions,
  opts: CalibrationOptions,
): StyleCalibration {
  const mine = jobs.filter((j) => j.styleId === current.styleId);
  const minJobs = opts.minJobs ?? MIN_JOBS;
  const base: SuggestOptions = { minJobs, recencyHalfLifeDays: opts.halfLifeDays };
  const drafts = [...labourDrafts(mine, current.rates, ex, base, opts.today), ...wasteDrafts(mine, current.wastePct, ex, base, opts.today), ...rentalDraft(mine, current.rates, ex, base, opts.today)];
  const items = drafts.map((d) => finishItem(d, minJobs));
  const used = mine.filter((j) => !ex.get(j.jobId)?.has('job'));
  const ratio = (xs: [number, number][]) => spreadOf(xs.filter(([, b]) => b > 0).map(([a, b]) => a / b));
  return {
    styleId: current.styleId,
    styleName: current.styleName,
    jobs: mine.length,
    excludedJobs: mine.length - used.length,
    items,
    backtest: styleBacktest(mine, items, ex),
    categories: COST_GROUPS.map((group) => {
      const pairs = used.map((j) => [j.actual[group], j.estimated[group]] as [number, number]).filter(([, e]) => e > 0);
      return { group, n: pairs.length, ratio: ratio(pairs) };
    }),
    rentals: (() => {
      const pairs = used.filter((j) => j.rentalDays.bid > 0).map((j) => [j.rentalDays.actual, j.rentalDays.bid] as [number, number]);
      return { n: pairs.length, bidMedian: medianOf(pairs.map((p) => p[1])), actualMedian: medianOf(pairs.map((p) => p[0])), ratio: ratio(pairs) };
    })(),
  };
}
