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
 * 2 % of a labour rate, 1 % of (1 + waste), about one point of waste.
 */
export const MIN_CHANGE = { labour: 0.02, waste: 0.01 } as const;

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
  kind: 'labour' | 'waste';
  label: string;
  unit: string;
  rateKinds: RateKind[];
  wasteKey: WasteKey | null;
}

export interface CalibrationItem extends ItemIdentity {
  /** Today's value in the item's unit: crew-h per unit, or a waste percent. */
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

function finishItem(d: Draft, minJobs: number): CalibrationItem {
  const used = d.obs.filter((o) => !o.excluded);
  const s = suggestRate(used, d.opts);
  const free = suggestRate(used, { ...d.opts, bounds: undefined });
  const bt = used.length ? backtest(used, d.opts) : null;
  const rows = new Map(bt?.rows.map((r) => [r.jobId, r]) ?? []);
  const held = s.rate !== null && free.rate !== null && d.show(free.rate) !== d.show(s.rate);
  const change = s.rate === null ? 0 : Math.abs(s.rate - d.currentRate) / (d.currentRate || 1);
  const achieved = (o: RateObservation) => o.actualHours / o.quantity;
  const raw = used.map((o) => o.boughtToTakeoff).filter((x): x is number => x !== undefined);
  return {
    key: d.key, kind: d.kind, label: d.label, unit: d.unit, rateKinds: d.rateKinds, wasteKey: d.wasteKey,
    current: d.show(d.currentRate), currentValues: d.currentValues, n: used.length,
    bidMedian: used.length ? d.show(median(used.map((o) => o.bidRate))) : null,
    actualMedian: used.length ? d.show(median(used.map(achieved))) : null,
    ratio: spreadOf(used.map((o) => achieved(o) / o.bidRate)),
    boughtToTakeoffMedian: medianOf(raw),
    suggested: s.rate === null ? null : d.show(s.rate), suggestedValues: s.rate === null ? null : d.values(s.rate), held,
    reason: s.rate === null ? s.reason ?? null : null, spread: s.spread,
    backtest: bt ? { n: bt.n, current: bt.current, suggested: bt.suggested, improves: bt.improves } : null,
    backtestNote: s.rate !== null && bt && bt.suggested === null ? `The backtest judges each job by a rate fitted on the others, so it needs ${minJobs + 1} jobs; there are ${used.length}.` : null,
    applicable: Boolean(bt?.improves) && change >= MIN_CHANGE[d.kind] - 1e-12 && used.length >= minJobs,
    jobs: d.obs.map((o) => {
      const r = rows.get(o.jobId);
      return {
        jobId: o.jobId, code: o.code, quantity: o.quantity, bid: d.show(o.bidRate), actual: d.show(achieved(o)), ratio: o.bidRate > 0 ? achieved(o) / o.bidRate : null,
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
  const drafts = [...labourDrafts(mine, current.rates, ex, base, opts.today), ...wasteDrafts(mine, current.wastePct, ex, base, opts.today)];
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
