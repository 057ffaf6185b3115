import { centsText, toCsv, type CsvColumn } from '../csv/write.ts';
import { JOB_STATUS_LABELS } from '../jobs/schema.ts';
import type { JobMargin } from '../margins/job.ts';
import type { MonthMargin, StyleMargin } from '../margins/by-style.ts';
import type { WipJob, WipReport } from '../margins/wip.ts';

/**
 * The reports as CSV: the same rows and the same rounded numbers the screen shows (money
 * as dollars with two decimals, percents to one decimal, feet to the thousandth).
 */

const money = <T>(header: string, f: (r: T) => number | null): CsvColumn<T> => ({ header, type: 'number', value: (r) => centsText(f(r)) });
const num = <T>(header: string, f: (r: T) => number | null | undefined): CsvColumn<T> => ({ header, type: 'number', value: (r) => f(r) ?? '' });
const text = <T>(header: string, f: (r: T) => string | null | undefined): CsvColumn<T> => ({ header, type: 'text', value: f });

const STYLE_COLUMNS: CsvColumn<StyleMargin>[] = [
  text('Style', (r) => r.styleName),
  num('Jobs', (r) => r.jobs),
  num('Jobs with a measured length', (r) => r.jobsWithFeet),
  num('Linear feet', (r) => r.linearFt),
  money('Revenue', (r) => r.revenueCents),
  money('Cost', (r) => r.costCents),
  money('Estimated cost', (r) => r.estimatedCostCents),
  money('Gross profit', (r) => r.grossProfitCents),
  num('Gross margin %', (r) => r.marginPct),
  num('Estimated margin %', (r) => r.estimatedMarginPct),
  money('Gross profit per ft', (r) => r.grossProfitPerFtCents),
  money('Revenue per ft', (r) => r.revenuePerFtCents),
  money('Material cost per ft', (r) => r.costPerFt.material),
  money('Labour cost per ft', (r) => r.costPerFt.labour),
  money('Rental cost per ft', (r) => r.costPerFt.rental),
  money('Other cost per ft', (r) => r.costPerFt.other),
  num('Median job margin %', (r) => r.spread?.medianPct),
  num('Lower quartile %', (r) => r.spread?.q1Pct),
  num('Upper quartile %', (r) => r.spread?.q3Pct),
  num('Interquartile range, points', (r) => r.spread?.iqrPts),
  num('Mean job margin %', (r) => r.spread?.meanPct),
];

export const styleCsv = (rows: StyleMargin[], total: StyleMargin) => toCsv(STYLE_COLUMNS, [...rows, total]);

const MONTH_COLUMNS: CsvColumn<MonthMargin>[] = [
  text('Month', (r) => r.month),
  num('Jobs', (r) => r.jobs),
  money('Revenue', (r) => r.revenueCents),
  money('Cost', (r) => r.costCents),
  money('Gross profit', (r) => r.grossProfitCents),
  num('Gross margin %', (r) => r.marginPct),
  num('Estimated margin %', (r) => r.estimatedMarginPct),
];

export const monthCsv = (rows: MonthMargin[]) => toCsv(MONTH_COLUMNS, rows);

const JOB_COLUMNS: CsvColumn<JobMargin>[] = [
  text('Job', (r) => r.code),
  text('Title', (r) => r.title),
  text('Customer', (r) => r.customerName),
  text('Style', (r) => r.styleName),
  text('Estimator', (r) => r.estimatorName),
  text('Status', (r) => (r.status ? JOB_STATUS_LABELS[r.status] : '')),
  text('Report date', (r) => r.reportDate),
  num('Linear feet', (r) => r.linearFt),
  money('Contract', (r) => r.contractCents),
  money('Billed against the contract', (r) => r.billedCents),
  money('Collected, tax included', (r) => r.collectedCents),
  money('Estimated cost', (r) => r.estimatedCostCents),
  money('Cost to date', (r) => r.costToDateCents),
  money('Gross profit', (r) => r.grossProfitCents),
  num('Gross margin %', (r) => r.marginPct),
  num('Estimated margin %', (r) => r.estimatedMarginPct),
  num('Margin against estimate, points', (r) => r.marginDeltaPts),
  money('Gross profit per ft', (r) => r.grossProfitPerFtCents),
];

/** The jobs, then a total row with the sums (and the margins of the sums). */
export function jobsCsv(rows: JobMargin[], total: StyleMargin): string {
  const sum = (f: (r: JobMargin) => number) => rows.reduce((a, r) => a + f(r), 0);
  const t = {
    code: 'Total', title: `${rows.length} jobs`, customerName: '', styleName: null, estimatorName: null, status: null, reportDate: null, linearFt: total.linearFt,
    contractCents: total.revenueCents, billedCents: sum((r) => r.billedCents), collectedCents: sum((r) => r.collectedCents), estimatedCostCents: total.estimatedCostCents,
    costToDateCents: total.costCents, grossProfitCents: total.grossProfitCents, marginPct: total.marginPct, estimatedMarginPct: total.estimatedMarginPct,
    marginDeltaPts: total.marginPct === null || total.estimatedMarginPct === null ? null : Math.round((total.marginPct - total.estimatedMarginPct) * 10) / 10,
    grossProfitPerFtCents: total.grossProfitPerFtCents,
  } as unknown as JobMargin;
  return toCsv(JOB_COLUMNS, [...rows, t]);
}

type WipCsvRow = Omit<WipJob, 'percentComplete' | 'atRisk' | 'projectedMarginPct'> & { percentComplete: number | null; atRisk: boolean | null; projectedMarginPct: number | null };

const WIP_COLUMNS: CsvColumn<WipCsvRow>[] = [
  text('Job', (r) => r.code),
  text('Title', (r) => r.title),
  text('Style', (r) => r.styleName),
  text('Status', (r) => (r.status ? JOB_STATUS_LABELS[r.status as keyof typeof JOB_STATUS_LABELS] : '')),
  money('Contract', (r) => r.contractCents),
  money('Estimated cost, bid and change orders', (r) => r.estimatedCostCents),
  money('Estimated total cost, overruns to date included', (r) => r.projectedCostCents),
  money('Cost to date', (r) => r.costToDateCents),
  num('Percent complete', (r) => r.percentComplete),
  money('Earned revenue', (r) => r.earnedCents),
  money('Billed to date', (r) => r.billedCents),
  money('Over (+) or under (-) billed', (r) => r.overUnderCents),
  money('Projected gross profit', (r) => r.projectedGrossProfitCents),
  num('Projected margin %', (r) => r.projectedMarginPct),
  text('Margin at risk', (r) => (r.atRisk === null ? '' : r.atRisk ? 'yes' : 'no')),
];

export function wipCsv(w: WipReport): string {
  const t = w.totals;
  const total: WipCsvRow = {
    jobId: 0, code: 'Total', title: `${w.jobs.length} open jobs, ${t.atRisk} at risk`, status: '', styleName: null, estimatorName: null, customerName: '',
    contractCents: t.contractCents, estimatedCostCents: t.estimatedCostCents, costToDateCents: t.costToDateCents, percentComplete: null, overEstimate: false,
    earnedCents: t.earnedCents, billedCents: t.billedToDateCents, overUnderCents: t.netOverUnderCents, projectedCostCents: t.projectedCostCents,
    projectedGrossProfitCents: t.projectedGrossProfitCents, projectedMarginPct: null, estimatedMarginPct: null, atRisk: null,
  };
  return toCsv<WipCsvRow>(WIP_COLUMNS, [...w.jobs, total]);
}
