import { mean, spread } from '../stats/robust.ts';
import { COST_GROUPS, centsPerFoot, emptyGroups, pct1, type ByGroup, type JobMargin } from './job.ts';

/**
 * Jobs summed by fence style: revenue, cost, margin, margin and cost per linear foot, the
 * margin the bids planned, and the spread of the jobs' own margins (median and quartiles,
 * because one job that went wrong moves a mean a long way).
 */

export interface MarginSpread {
  /** Per-job gross margins, percent: quartiles by linear interpolation (type 7). */
  medianPct: number;
  q1Pct: number;
  q3Pct: number;
  iqrPts: number;
  minPct: number;
  maxPct: number;
  /** The plain mean of the jobs' margins, beside the median. */
  meanPct: number;
}

export interface StyleMargin {
  styleId: number | null;
  styleName: string;
  jobs: number;
  /** Jobs with a measured length (an accepted bid): the per-foot figures use only these. */
  jobsWithFeet: number;
  linearFt: number;
  revenueCents: number;
  costCents: number;
  estimatedCostCents: number;
  grossProfitCents: number;
  /** Gross profit ÷ revenue of all the style's jobs together, percent. */
  marginPct: number | null;
  estimatedMarginPct: number | null;
  grossProfitPerFtCents: number | null;
  revenuePerFtCents: number | null;
  costPerFt: Record<keyof ByGroup, number | null>;
  spread: MarginSpread | null;
}

const r1 = (x: number) => (Math.sign(x) * Math.round(Math.abs(x) * 10)) / 10;

function marginSpread(margins: number[]): MarginSpread | null {
  if (!margins.length) return null;
  const s = spread(margins);
  return { medianPct: r1(s.median), q1Pct: r1(s.q1), q3Pct: r1(s.q3), iqrPts: r1(s.iqr), minPct: r1(s.min), maxPct: r1(s.max), meanPct: r1(mean(margins)) };
}

/** Sums a set of jobs into one row (a style, or the total). */
export function summarise(styleId: number | null, styleName: string, jobs: readonly JobMargin[]): StyleMargin {
  let linearFt = 0, revenueCents = 0, costCents = 0, estimatedCostCents = 0, jobsWithFeet = 0, feetRevenue = 0, feetProfit = 0;
  const feetCost = emptyGroups();
  for (const j of jobs) {
    revenueCents += j.contractCents;
    costCents += j.costToDateCents;
    estimatedCostCents += j.estimatedCostCents;
    if (j.linearFt && j.linearFt > 0) {
      jobsWithFeet++;
      linearFt += j.linearFt;
      feetRevenue += j.contractCents;
      feetProfit += j.grossProfitCents;
      for (const g of COST_GROUPS) feetCost[g] += j.actual[g];
    }
  }
  // Feet are DECIMAL(10,3) in the database; the sum is kept to the thousandth.
  linearFt = Math.round(linearFt * 1000) / 1000;
  const grossProfitCents = revenueCents - costCents;
  const margins = jobs.map((j) => j.marginPct).filter((m): m is number => m !== null);
  return {
    styleId, styleName, jobs: jobs.length, jobsWithFeet, linearFt, revenueCents, costCents, estimatedCostCents, grossProfitCents,
    marginPct: pct1(grossProfitCents, revenueCents),
    estimatedMarginPct: pct1(revenueCents - estimatedCostCents, revenueCents),
    grossProfitPerFtCents: centsPerFoot(feetProfit, linearFt),
    revenuePerFtCents: centsPerFoot(feetRevenue, linearFt),
    costPerFt: Object.fromEntries(COST_GROUPS.map((g) => [g, centsPerFoot(feetCost[g], linearFt)])) as StyleMargin['costPerFt'],
    spread: marginSpread(margins),
  };
}

export interface MarginByStyle {
  styles: StyleMargin[];
  total: StyleMargin;
}

/** One row per style (jobs without a style together at the end), ordered by name, and the total. */
export function marginByStyle(jobs: readonly JobMargin[]): MarginByStyle {
  const groups = new Map<string, { id: number | null; name: string; jobs: JobMargin[] }>();
  for (const j of jobs) {
    const key = j.styleId === null ? 'none' : String(j.styleId);
    const g = groups.get(key) ?? { id: j.styleId, name: j.styleName ?? 'No style', jobs: [] };
    g.jobs.push(j);
    groups.set(key, g);
  }
  const styles = [...groups.values()]
    .sort((a, b) => (a.id === null ? 1 : b.id === null ? -1 : a.name.localeCompare(b.name)))
    .map((g) => summarise(g.id, g.name, g.jobs));
  return { styles, total: summarise(null, 'All styles', jobs) };
}

export interface MonthMargin {
  /** YYYY-MM */
  month: string;
  jobs: number;
  revenueCents: number;
  costCents: number;
  grossProfitCents: number;
  marginPct: number | null;
  estimatedMarginPct: number | null;
}

function nextMonth(m: string): string {
  const y = Number(m.slice(0, 4));
  const mo = Number(m.slice(5, 7));
  return mo === 12 ? `${y + 1}-01` : `${y}-${String(mo + 1).padStart(2, '0')}`;
}

/** Jobs by the month of their report date, with every month between the first and the last. */
export function marginByMonth(jobs: readonly JobMargin[]): MonthMargin[] {
  const by = new Map<string, JobMargin[]>();
  for (const j of jobs) {
    if (!j.reportDate) continue;
    const m = j.reportDate.slice(0, 7);
    by.set(m, [...(by.get(m) ?? []), j]);
  }
  const months = [...by.keys()].sort();
  if (!months.length) return [];
  const out: MonthMargin[] = [];
  for (let m = months[0]; m <= months[months.length - 1]; m = nextMonth(m)) {
    const s = summarise(null, m, by.get(m) ?? []);
    out.push({ month: m, jobs: s.jobs, revenueCents: s.revenueCents, costCents: s.costCents, grossProfitCents: s.grossProfitCents, marginPct: s.marginPct, estimatedMarginPct: s.estimatedMarginPct });
  }
  return out;
}
