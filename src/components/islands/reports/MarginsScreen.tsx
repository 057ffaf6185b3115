import { useMemo, useState } from 'react';
import { Bar, Line, Scatter } from 'react-chartjs-2';
import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { COLOURS, POINT_STYLES, baseOptions, dollars, fill, money0 } from './charts';
import { ChartCard, Scroll } from './ChartCard';
import { FilterBar, useReport, type Filter, type FilterOptions } from './filters';
import { SortableTable } from '../invoices/SortableTable';
import { formatDate, formatMoney, formatPct, type CurrencyCode } from '../../../lib/format';
import { COST_GROUPS, COST_GROUP_LABELS, type JobMargin } from '../../../lib/margins/job';
import type { MonthMargin, StyleMargin } from '../../../lib/margins/by-style';
import { BEST_WORST_MIN_JOBS, bestAndWorst } from '../../../lib/margins/dashboard';
import { REPORT_STATUSES, REPORT_STATUS_LABELS, filterParams } from '../../../lib/reports/filters';
import { JOB_STATUS_LABELS } from '../../../lib/jobs/schema';

export interface MarginData {
  currency: CurrencyCode;
  today: string;
  targetMarginPct: number;
  filter: Filter;
  options: FilterOptions;
  styles: StyleMargin[];
  total: StyleMargin;
  months: MonthMargin[];
  jobs: JobMargin[];
}

const STATUSES = REPORT_STATUSES.map((s) => ({ id: s, name: REPORT_STATUS_LABELS[s] }));
const FILLS = ['solid', 'stripes', 'dots', 'cross'] as const;
const GROUP_COLOURS = [COLOURS.timber, COLOURS.galv, COLOURS.moss, COLOURS.sand];
const signedPts = (v: number | null) => (v === null ? '—' : `${v > 0 ? '+' : ''}${v.toFixed(1)} pts`);
const col = createColumnHelper<JobMargin>();

/** Margins by fence style: the table, four charts each with its numbers, and the jobs behind them. */
export default function MarginsScreen({ initial }: { initial: MarginData }) {
  const { filter, setFilter, data, error, loading } = useReport<MarginData>(['/api/reports/jobs', '/api/reports/margin-by-style'], initial.filter, initial);
  const m = (c: number | null) => formatMoney(c, data.currency);
  const csv = (path: string) => `${path}?${filterParams(filter, { format: 'csv' })}`;
  const styles = data.styles;
  // The dashboard's rule: most and least gross profit per foot among styles with at least two measured jobs.
  const { best, worst } = bestAndWorst(styles);

  const marginChart = useMemo(() => ({
    labels: styles.map((s) => s.styleName),
    datasets: [
      { label: 'Estimated margin % (striped)', data: styles.map((s) => s.estimatedMarginPct), backgroundColor: fill(COLOURS.galv, 'stripes'), borderColor: COLOURS.galv, borderWidth: 1 },
      { label: 'Actual margin % (solid)', data: styles.map((s) => s.marginPct), backgroundColor: fill(COLOURS.timber, 'solid'), borderColor: COLOURS.timber, borderWidth: 1 },
    ],
  }), [styles]);
  const costChart = useMemo(() => ({
    labels: styles.map((s) => s.styleName),
    datasets: COST_GROUPS.map((g, i) => ({
      label: `${COST_GROUP_LABELS[g]} (${FILLS[i] === 'solid' ? 'solid' : FILLS[i] === 'cross' ? 'cross-hatched' : FILLS[i]})`,
      data: styles.map((s) => (s.costPerFt[g] === null ? null : dollars(s.costPerFt[g]!))),
      backgroundColor: fill(GROUP_COLOURS[i], FILLS[i]), borderColor: GROUP_COLOURS[i], borderWidth: 1, stack: 'cost',
    })),
  }), [styles]);
  const monthChart = useMemo(() => ({
    labels: data.months.map((x) => x.month),
    datasets: [
      { label: 'Actual margin % (solid line, circles)', data: data.months.map((x) => x.marginPct), borderColor: COLOURS.timber, backgroundColor: COLOURS.timber, pointStyle: 'circle' as const, pointRadius: 4, spanGaps: true },
      { label: 'Estimated margin % (dashed line, triangles)', data: data.months.map((x) => x.estimatedMarginPct), borderColor: COLOURS.galv, backgroundColor: COLOURS.galv, borderDash: [6, 4], pointStyle: 'triangle' as const, pointRadius: 5, spanGaps: true },
      { label: `Target ${data.targetMarginPct} % (dotted)`, data: data.months.map(() => data.targetMarginPct), borderColor: COLOURS.rust, backgroundColor: COLOURS.rust, borderDash: [2, 3], pointRadius: 0 },
    ],
  }), [data.months, data.targetMarginPct]);
  // Actual cost as a percent of the estimate against the estimate: a perfect bid sits on the
  // 100 % line whatever the job's size, so a style whose points ride above it bids low.
  const overPct = (j: JobMargin) => Math.round((j.costToDateCents / j.estimatedCostCents) * 1000) / 10;
  const scatter = useMemo(() => {
    const shown = data.jobs.filter((j) => j.estimatedCostCents > 0);
    const byStyle = styles.map((s, i) => ({
      label: `${s.styleName} (${POINT_STYLES[i % POINT_STYLES.length]})`,
      data: shown.filter((j) => j.styleId === s.styleId).map((j) => ({ x: dollars(j.estimatedCostCents), y: overPct(j), code: j.code })),
      pointStyle: POINT_STYLES[i % POINT_STYLES.length], pointRadius: 6, borderColor: [COLOURS.timber, COLOURS.galv, COLOURS.moss, COLOURS.rust, COLOURS.sand, COLOURS.steel][i % 6],
      backgroundColor: 'rgba(255,255,255,0.6)', borderWidth: 2,
    }));
    const top = Math.max(1, ...shown.map((j) => j.estimatedCostCents)) / 100;
    return { datasets: [...byStyle, { label: 'Perfect bid: actual cost = estimate (dashed)', data: [{ x: 0, y: 100 }, { x: top * 1.05, y: 100 }], showLine: true, pointRadius: 0, pointStyle: 'line' as const, borderColor: COLOURS.steel, borderDash: [6, 4], borderWidth: 1.5 }] };
  }, [styles, data.jobs]);

  const [sorting, setSorting] = useState<SortingState>([{ id: 'code', desc: false }]);
  const right = (v: string) => <span className="block text-right tabular-nums">{v}</span>;
  const columns = useMemo(() => [
    col.accessor('code', { header: 'Job', cell: (c) => <a className="whitespace-nowrap font-semibold" href={`/jobs/${c.row.original.jobId}`}>{c.getValue()}</a> }),
    col.accessor('styleName', { header: 'Style', cell: (c) => c.getValue() ?? '—' }),
    col.accessor('status', { header: 'Status', cell: (c) => JOB_STATUS_LABELS[c.getValue()] }),
    col.accessor('reportDate', { header: 'Date', cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
    col.accessor('contractCents', { header: 'Contract', cell: (c) => right(m(c.getValue())) }),
    col.accessor('billedCents', { header: 'Billed', cell: (c) => right(m(c.getValue())) }),
    col.accessor('collectedCents', { header: 'Collected', cell: (c) => right(m(c.getValue())) }),
    col.accessor('costToDateCents', { header: 'Cost', cell: (c) => right(m(c.getValue())) }),
    col.accessor('grossProfitCents', { header: 'Gross profit', cell: (c) => right(m(c.getValue())) }),
    col.accessor((r) => r.marginPct ?? -Infinity, { id: 'margin', header: 'Margin', cell: (c) => right(formatPct(c.row.original.marginPct)) }),
    col.accessor((r) => r.estimatedMarginPct ?? -Infinity, { id: 'estimated', header: 'Bid planned', cell: (c) => right(formatPct(c.row.original.estimatedMarginPct)) }),
    col.accessor((r) => r.marginDeltaPts ?? -Infinity, { id: 'delta', header: 'Against bid', cell: (c) => right(signedPts(c.row.original.marginDeltaPts)) }),
  ], [data.currency]);
  const table = useReactTable({ data: data.jobs, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  const t = data.total;

  return (
    <div className="space-y-4" data-testid="margins-screen">
      <FilterBar filter={filter} setFilter={setFilter} options={data.options} statuses={STATUSES} defaultStatus={['completed', 'closed']} loading={loading} error={error} />
      <ul className="grid grid-cols-2 gap-3 lg:grid-cols-4" aria-label="Totals">
        <li className="card p-3"><span className="block text-xs text-galv-500">Revenue · {t.jobs} jobs</span><span className="text-xl font-semibold" data-testid="total-revenue">{m(t.revenueCents)}</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Cost</span><span className="text-xl font-semibold">{m(t.costCents)}</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Gross profit</span><span className="text-xl font-semibold" data-testid="total-profit">{m(t.grossProfitCents)}</span>
          <span className="block text-xs text-galv-600">{formatPct(t.marginPct)} margin · target {data.targetMarginPct} % · bids planned {formatPct(t.estimatedMarginPct)}</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Most gross profit per foot</span><span className="text-xl font-semibold" data-testid="best-style">{best ? best.styleName : '—'}</span>
          <span className="block text-xs text-galv-600">{best ? `${m(best.grossProfitPerFtCents)} per ft over ${best.linearFt.toLocaleString('en-US')} ft` : `No style with ${BEST_WORST_MIN_JOBS} measured jobs`}</span>
          {worst && <span className="block text-xs text-galv-600">Least: <span data-testid="worst-style">{worst.styleName}</span>, {m(worst.grossProfitPerFtCents)} per ft</span>}</li>
      </ul>

      <section className="card" aria-labelledby="by-style-title">
        <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="by-style-title">By fence style</h2>
          <a className="btn-secondary" href={csv('/api/reports/margin-by-style')} download>Export CSV</a>
        </div>
        <Scroll label="Margins by fence style">
          <table className="table-dense" data-testid="style-table">
            <thead><tr><th>Style</th><th className="num">Jobs</th><th className="num">Linear ft</th><th className="num">Revenue</th><th className="num">Cost</th><th className="num">Gross profit</th><th className="num">Margin</th><th className="num">Bids planned</th><th className="num">Profit per ft</th><th className="num">Median job margin</th></tr></thead>
            <tbody>
              {[...styles, t].map((s, i) => (
                <tr key={s.styleName} className={i === styles.length ? 'font-semibold' : ''} data-style={s.styleName}>
                  <td className="min-w-36">{s.styleName}</td>
                  <td className="num">{s.jobs}</td>
                  <td className="num">{s.linearFt.toLocaleString('en-US')}</td>
                  <td className="num">{m(s.revenueCents)}</td>
                  <td className="num">{m(s.costCents)}</td>
                  <td className="num" data-testid={`profit-${i}`}>{m(s.grossProfitCents)}</td>
                  <td className="num">{formatPct(s.marginPct)}</td>
                  <td className="num">{formatPct(s.estimatedMarginPct)}</td>
                  <td className="num">{m(s.grossProfitPerFtCents)}</td>
                  <td className="num whitespace-nowrap">{s.spread ? `${formatPct(s.spread.medianPct)} (${s.spread.q1Pct.toFixed(1)}–${s.spread.q3Pct.toFixed(1)})` : '—'}</td>
                </tr>
              ))}
              {styles.length === 0 && <tr><td colSpan={10} className="py-6 text-center text-galv-500">No jobs match these filters.</td></tr>}
            </tbody>
          </table>
        </Scroll>
        <p className="mt-2 text-xs text-galv-600">Revenue is the contract with approved change orders; cost is every cost line, crew hour and rental on the job. Per-foot figures use the jobs with an accepted bid's length ({t.jobsWithFeet} of {t.jobs}). The median job margin is shown with the middle half of the jobs' margins (lower to upper quartile) in brackets.</p>
      </section>

      <div className="grid gap-4 2xl:grid-cols-2">
        <ChartCard id="chart-margin" title="Margin by style: estimated beside actual" note="Striped bars are the margin the bids planned; solid bars what the jobs made."
          chart={<Bar role="img" aria-label="Bar chart of estimated and actual gross margin by fence style; the numbers are in the table beside it." data={marginChart} options={baseOptions<'bar'>({ scales: { y: { title: { display: true, text: 'Gross margin %' } } } })} />}
          table={
            <table className="table-dense">
              <thead><tr><th>Style</th><th className="num">Estimated</th><th className="num">Actual</th><th className="num">Difference</th></tr></thead>
              <tbody>{styles.map((s) => <tr key={s.styleName}><td>{s.styleName}</td><td className="num">{formatPct(s.estimatedMarginPct)}</td><td className="num">{formatPct(s.marginPct)}</td><td className="num">{signedPts(s.marginPct === null || s.estimatedMarginPct === null ? null : Math.round((s.marginPct - s.estimatedMarginPct) * 10) / 10)}</td></tr>)}</tbody>
            </table>
          } />
        <ChartCard id="chart-cost" title="Cost per linear foot by category" note="Each bar is a style's actual cost per foot of fence, stacked by category (each with its own fill)."
          chart={<Bar role="img" aria-label="Stacked bar chart of cost per linear foot by category for each fence style; the numbers are in the table beside it." data={costChart} options={baseOptions<'bar'>({ scales: { x: { stacked: true }, y: { stacked: true, title: { display: true, text: 'Dollars per linear foot' }, ticks: { callback: (v) => money0(v) } } } })} />}
          table={
            <table className="table-dense">
              <thead><tr><th>Style</th>{COST_GROUPS.map((g) => <th key={g} className="num">{COST_GROUP_LABELS[g]}</th>)}<th className="num">Total</th></tr></thead>
              <tbody>{styles.map((s) => <tr key={s.styleName}><td>{s.styleName}</td>{COST_GROUPS.map((g) => <td key={g} className="num">{m(s.costPerFt[g])}</td>)}<td className="num font-medium">{s.jobsWithFeet ? m(COST_GROUPS.reduce((a, g) => a + (s.costPerFt[g] ?? 0), 0)) : '—'}</td></tr>)}</tbody>
            </table>
          } />
        <ChartCard id="chart-months" title="Margin over time" note={<>Jobs by the month they were completed (or started, while open). <a href={csv('/api/reports/margin-by-month')} download>Export the months as CSV</a>.</>}
          chart={<Line role="img" aria-label="Line chart of actual and estimated gross margin by month against the target; the numbers are in the table beside it." data={monthChart} options={baseOptions<'line'>({ scales: { y: { title: { display: true, text: 'Gross margin %' } } } })} />}
          table={
            <table className="table-dense">
              <thead><tr><th>Month</th><th className="num">Jobs</th><th className="num">Revenue</th><th className="num">Margin</th><th className="num">Estimated</th></tr></thead>
              <tbody>{data.months.map((x) => <tr key={x.month}><td className="whitespace-nowrap">{x.month}</td><td className="num">{x.jobs}</td><td className="num">{m(x.revenueCents)}</td><td className="num">{formatPct(x.marginPct)}</td><td className="num">{formatPct(x.estimatedMarginPct)}</td></tr>)}</tbody>
            </table>
          } />
        <ChartCard id="chart-scatter" title="Estimate against actual, job by job" note="Each point is a job (one shape per style): its estimated cost across, its actual cost as a percent of the estimate up. Points above the dashed line of perfect bids cost more than the bid allowed."
          chart={<Scatter role="img" aria-label="Scatter chart of each job's estimated cost against its actual cost as a percent of the estimate, with the line of perfect bids at 100 percent; the numbers are in the table beside it." data={scatter}
            options={baseOptions<'scatter'>({ scales: { x: { min: 0, title: { display: true, text: 'Estimated cost' }, ticks: { callback: (v) => money0(v) } }, y: { title: { display: true, text: 'Actual cost, % of estimate' } } },
              plugins: { legend: { position: 'bottom', labels: { usePointStyle: true } }, tooltip: { callbacks: { label: (c) => { const p = c.raw as { x: number; y: number; code?: string }; return p.code ? `${p.code}: estimated ${money0(p.x)}, actual ${p.y.toFixed(1)} % of it` : 'perfect bid'; } } } } })} />}
          table={
            <table className="table-dense">
              <thead><tr><th>Job</th><th>Style</th><th className="num">Estimated</th><th className="num">Actual</th><th className="num">Actual ÷ estimate</th></tr></thead>
              <tbody>{data.jobs.map((j) => <tr key={j.jobId}><td className="whitespace-nowrap"><a href={`/jobs/${j.jobId}`}>{j.code}</a></td><td>{j.styleName ?? '—'}</td><td className="num">{m(j.estimatedCostCents)}</td><td className="num">{m(j.costToDateCents)}</td><td className="num">{j.estimatedCostCents > 0 ? formatPct(overPct(j)) : '—'}</td></tr>)}</tbody>
            </table>
          } />
      </div>

      <section className="card" aria-labelledby="jobs-title">
        <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="jobs-title">Jobs</h2>
          <a className="btn-secondary" href={csv('/api/reports/jobs')} download>Export CSV</a>
        </div>
        <Scroll label="Jobs" testId="jobs-table">
          <SortableTable table={table} loading={loading} empty="No jobs match these filters."
            footer={<tfoot><tr className="font-semibold"><td colSpan={4} className="px-3 py-2">{t.jobs} jobs</td><td className="px-3 py-2 text-right">{m(t.revenueCents)}</td><td className="px-3 py-2 text-right">{m(data.jobs.reduce((a, j) => a + j.billedCents, 0))}</td><td className="px-3 py-2 text-right">{m(data.jobs.reduce((a, j) => a + j.collectedCents, 0))}</td><td className="px-3 py-2 text-right">{m(t.costCents)}</td><td className="px-3 py-2 text-right">{m(t.grossProfitCents)}</td><td className="px-3 py-2 text-right">{formatPct(t.marginPct)}</td><td className="px-3 py-2 text-right">{formatPct(t.estimatedMarginPct)}</td><td></td></tr></tfoot>} />
        </Scroll>
        <p className="mt-2 text-xs text-galv-600">Billed is what issued invoices billed against the contract, before tax; collected is what customers paid on them, tax included.</p>
      </section>
    </div>
  );
}
