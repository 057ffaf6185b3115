import type { Actor } from '../http.ts';
import { notFound } from '../../lib/errors.ts';
import { can } from '../../lib/auth/permissions.ts';
import { jobMargin, type JobMargin } from '../../lib/margins/job.ts';
import { marginByMonth, marginByStyle, summarise } from '../../lib/margins/by-style.ts';
import { wipReport } from '../../lib/margins/wip.ts';
import { bestAndWorst, quarterOf, yearBefore } from '../../lib/margins/dashboard.ts';
import { jobsCsv, monthCsv, styleCsv, wipCsv } from '../../lib/reports/csv.ts';
import type { ReportFilter, WipFilter } from '../../lib/reports/filters.ts';
import { filterOptions, jobFigures, type FigureFilter } from '../repos/reports.ts';
import { billingSettings, todayIn } from '../repos/billing-settings.ts';
import { getSettings } from '../repos/settings.ts';
import { cachedReport, filterKey } from '../report-cache.ts';

/** The company's currency, today where it works, and its target margin. */
async function context(companyId: string) {
  const [b, s] = await Promise.all([billingSettings(companyId), getSettings(companyId)]);
  return { currency: b.currency, today: todayIn(b.timezone), targetMarginPct: s.targetMarginPct };
}

async function margins(actor: Actor, f: FigureFilter): Promise<JobMargin[]> {
  return (await jobFigures(actor.companyId, f)).map(jobMargin);
}

const stripFormat = <T extends { format?: unknown }>(f: T) => {
  const { format: _format, ...rest } = f;
  return rest;
};

/** The margins screen's first view: the style and month figures and the jobs behind them, from one read. */
export async function marginScreen(actor: Actor, filter: ReportFilter) {
  const [ctx, options, jobs] = await Promise.all([context(actor.companyId), filterOptions(actor.companyId), margins(actor, filter)]);
  return { ...ctx, filter: stripFormat(filter), options, ...marginByStyle(jobs), months: marginByMonth(jobs), jobs };
}

/**
 * Margins by style and by month: the job rows are summed, not sent (they are the jobs report).
 * Served from the report cache while the company's data is unchanged; `fresh` recomputes.
 */
export async function marginReport(actor: Actor, filter: ReportFilter, opts: { fresh?: boolean } = {}) {
  // The filter choices come with the screen's first view; a new filter needs only the figures.
  return cachedReport(actor.companyId, filterKey('margin-by-style', stripFormat(filter)), async () => {
    const [ctx, jobs] = await Promise.all([context(actor.companyId), margins(actor, filter)]);
    return { ...ctx, filter: stripFormat(filter), ...marginByStyle(jobs), months: marginByMonth(jobs) };
  }, { ...opts, version: actor.dataVersion });
}

export async function jobsReport(actor: Actor, filter: ReportFilter) {
  const [ctx, jobs] = await Promise.all([context(actor.companyId), margins(actor, filter)]);
  return { ...ctx, filter: stripFormat(filter), jobs, total: summarise(null, 'All jobs', jobs) };
}

export async function wip(actor: Actor, filter: WipFilter) {
  const [ctx, options, jobs] = await Promise.all([context(actor.companyId), filterOptions(actor.companyId), margins(actor, filter)]);
  return { ...ctx, filter: stripFormat(filter), options, ...wipReport(jobs, ctx.targetMarginPct) };
}

export type CsvReport = 'margin-by-style' | 'margin-by-month' | 'jobs' | 'wip';

/** A report as a CSV download built from the same numbers as the JSON. */
export async function reportCsv(actor: Actor, report: CsvReport, filter: ReportFilter | WipFilter): Promise<Response> {
  let csv: string;
  let today: string;
  if (report === 'wip') {
    const w = await wip(actor, filter as WipFilter);
    csv = wipCsv(w);
    today = w.today;
  } else {
    const r = await marginScreen(actor, filter as ReportFilter);
    today = r.today;
    csv = report === 'margin-by-style' ? styleCsv(r.styles, r.total) : report === 'margin-by-month' ? monthCsv(r.months) : jobsCsv(r.jobs, r.total);
  }
  return new Response(csv, {
    headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${report}-${today}.csv"`, 'cache-control': 'no-store' },
  });
}

/** One job's margin for its page: the same figures the reports use. */
export async function jobMarginOf(actor: Actor, jobId: number) {
  const [ctx, rows] = await Promise.all([context(actor.companyId), jobFigures(actor.companyId, { status: [], jobId })]);
  if (!rows.length) throw notFound('That job');
  const j = jobMargin(rows[0]);
  const w = j.final ? null : wipReport([j], ctx.targetMarginPct).jobs[0];
  return { ...ctx, job: j, wip: w };
}

/**
 * The owner's margin tiles: gross margin of the jobs finished this quarter against the
 * target, open jobs whose projected margin is below it, and the styles that earned the
 * most and the least per foot over the last twelve months.
 */
export async function dashboardMargins(actor: Actor) {
  const ctx = await context(actor.companyId);
  const quarter = quarterOf(ctx.today);
  const twelveMonths = { from: yearBefore(ctx.today), to: ctx.today };
  const [thisQuarter, year, open] = await Promise.all([
    margins(actor, { status: ['completed', 'closed'], from: quarter.from, to: quarter.to, style: [], estimator: [] }),
    margins(actor, { status: ['completed', 'closed'], ...twelveMonths, style: [], estimator: [] }),
    can(actor.role, 'wip:read') ? margins(actor, { status: ['won', 'building'], style: [], estimator: [] }) : Promise.resolve(null),
  ]);
  const styles = marginByStyle(year).styles;
  return {
    ...ctx,
    quarter: { ...quarter, ...summarise(null, quarter.label, thisQuarter) },
    atRisk: open ? wipReport(open, ctx.targetMarginPct).jobs.filter((j) => j.atRisk).sort((a, b) => (a.projectedMarginPct ?? -Infinity) - (b.projectedMarginPct ?? -Infinity)) : null,
    openJobs: open?.length ?? null,
    /** The range best and worst are judged over: the margins screen with it names the same styles. */
    twelveMonths,
    ...bestAndWorst(styles),
  };
}
