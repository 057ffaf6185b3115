import { useMemo, useState } from 'react';
import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { FilterBar, useReport, type Filter, type FilterOptions } from './filters';
import { Scroll } from './ChartCard';
import { SortableTable } from '../invoices/SortableTable';
import { formatMoney, formatPct, type CurrencyCode } from '../../../lib/format';
import type { WipJob, WipReport } from '../../../lib/margins/wip';
import { WIP_FILTER_STATUSES, REPORT_STATUS_LABELS, filterParams } from '../../../lib/reports/filters';
import { JOB_STATUS_LABELS, type JobStatus } from '../../../lib/jobs/schema';

export interface WipData extends WipReport {
  currency: CurrencyCode;
  today: string;
  targetMarginPct: number;
  filter: Filter;
  options: FilterOptions;
}

const STATUSES = WIP_FILTER_STATUSES.map((s) => ({ id: s, name: REPORT_STATUS_LABELS[s] }));
const col = createColumnHelper<WipJob>();

/** Open jobs by percent complete (cost to cost): earned, billed, and over- or under-billing. */
export default function WipScreen({ initial }: { initial: WipData }) {
  const { filter, setFilter, data, error, loading } = useReport<WipData>('/api/reports/wip', initial.filter, initial);
  const m = (c: number | null) => formatMoney(c, data.currency);
  const [sorting, setSorting] = useState<SortingState>([{ id: 'code', desc: false }]);
  const right = (v: string, cls = '') => <span className={`block text-right tabular-nums ${cls}`}>{v}</span>;
  const columns = useMemo(() => [
    col.accessor('code', { header: 'Job', cell: (c) => <><a className="font-semibold" href={`/jobs/${c.row.original.jobId}`}>{c.getValue()}</a><span className="block text-xs text-galv-500">{c.row.original.styleName ?? ''}</span></> }),
    col.accessor('status', { header: 'Status', cell: (c) => JOB_STATUS_LABELS[c.getValue() as JobStatus] ?? c.getValue() }),
    col.accessor('contractCents', { header: 'Contract', cell: (c) => right(m(c.getValue())) }),
    col.accessor('projectedCostCents', {
      header: 'Estimated total cost', cell: (c) => (
        <span className="block text-right tabular-nums">
          {m(c.getValue())}{c.row.original.overEstimate && <span className="block whitespace-nowrap text-xs text-galv-600">bid {m(c.row.original.estimatedCostCents)}</span>}
        </span>
      ),
    }),
    col.accessor('costToDateCents', { header: 'Cost to date', cell: (c) => right(m(c.getValue())) }),
    col.accessor('percentComplete', {
      header: 'Complete', cell: (c) => (
        <span className="block min-w-24 text-right tabular-nums">
          {formatPct(c.getValue())}{c.row.original.overEstimate && <span className="block whitespace-nowrap text-xs text-rust-700">over the bid's cost</span>}
          <progress className="mt-1 block h-1.5 w-full overflow-hidden rounded [&::-webkit-progress-bar]:bg-galv-100 [&::-webkit-progress-value]:bg-timber-600 [&::-moz-progress-bar]:bg-timber-600" value={c.getValue()} max={100} aria-hidden="true" />
        </span>
      ),
    }),
    col.accessor('earnedCents', { header: 'Earned', cell: (c) => right(m(c.getValue())) }),
    col.accessor('billedCents', { header: 'Billed', cell: (c) => right(m(c.getValue())) }),
    col.accessor('overUnderCents', {
      header: 'Over / under', cell: (c) => {
        const v = c.getValue();
        return right(v === 0 ? 'even' : `${m(Math.abs(v))} ${v > 0 ? 'over' : 'under'}`, v > 0 ? 'text-timber-800' : v < 0 ? 'text-rust-700' : '');
      },
    }),
    col.accessor((r) => r.projectedMarginPct ?? -Infinity, {
      id: 'projected', header: 'Heading for', cell: (c) => (
        <span className="block whitespace-nowrap text-right">
          {formatPct(c.row.original.projectedMarginPct)}
          {c.row.original.atRisk && <span className="pill ml-1 bg-rust-100 text-rust-700">at risk</span>}
        </span>
      ),
    }),
  ], [data.currency]);
  const table = useReactTable({ data: data.jobs, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  const t = data.totals;
  return (
    <div className="space-y-4" data-testid="wip-screen">
      <FilterBar filter={filter} setFilter={setFilter} options={data.options} statuses={STATUSES} defaultStatus={[...WIP_FILTER_STATUSES]} loading={loading} error={error}
        exportHref={`/api/reports/wip?${filterParams(filter, { format: 'csv' })}`} />
      <ul className="grid grid-cols-2 gap-3 lg:grid-cols-5" aria-label="Totals">
        <li className="card p-3"><span className="block text-xs text-galv-500">Contracts · {data.jobs.length} open jobs</span><span className="text-lg font-semibold">{m(t.contractCents)}</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Earned to date</span><span className="text-lg font-semibold" data-testid="wip-earned">{m(t.earnedCents)}</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Billed to date</span><span className="text-lg font-semibold" data-testid="wip-billed">{m(t.billedToDateCents)}</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Billed ahead (over) · behind (under)</span><span className="block text-sm font-semibold">{m(t.overBilledCents)} over</span><span className="block text-sm font-semibold">{m(t.underBilledCents)} under</span></li>
        <li className="card p-3"><span className="block text-xs text-galv-500">Net</span><span className="text-lg font-semibold" data-testid="wip-net">{t.netOverUnderCents === 0 ? 'even' : `${m(Math.abs(t.netOverUnderCents))} ${t.netOverUnderCents > 0 ? 'over' : 'under'}`}</span>
          <span className="block text-xs text-galv-600">{t.atRisk} job{t.atRisk === 1 ? '' : 's'} heading below the {data.targetMarginPct} % target</span></li>
      </ul>
      <p className="text-xs text-galv-600" data-testid="wip-method">
        Complete = cost to date ÷ the estimated total cost. That estimate is the bid's cost with approved change orders, except that a cost group
        (material, labour, rental, other) already spent past its estimate counts at what it has spent and no underrun is counted before the job is
        done; so a job over its bid is not shown further along, or as having earned more, than it is.
      </p>
      <Scroll label="Open jobs" className="overflow-x-auto rounded-lg border border-galv-200 bg-white" testId="wip-table">
        <SortableTable table={table} loading={loading} empty="No open jobs match these filters."
          footer={<tfoot><tr className="font-semibold"><td colSpan={2} className="px-3 py-2">Total</td><td className="px-3 py-2 text-right">{m(t.contractCents)}</td><td className="px-3 py-2 text-right">{m(t.projectedCostCents)}</td><td className="px-3 py-2 text-right">{m(t.costToDateCents)}</td><td></td><td className="px-3 py-2 text-right">{m(t.earnedCents)}</td><td className="px-3 py-2 text-right">{m(t.billedToDateCents)}</td><td className="px-3 py-2 text-right whitespace-nowrap">{t.netOverUnderCents === 0 ? 'even' : `${m(Math.abs(t.netOverUnderCents))} ${t.netOverUnderCents > 0 ? 'over' : 'under'}`}</td><td></td></tr></tfoot>} />
      </Scroll>
    </div>
  );
}
