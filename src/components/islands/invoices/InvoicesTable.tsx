import { useEffect, useMemo, useRef, useState } from 'react';
import { createColumnHelper, getCoreRowModel, getPaginationRowModel, getSortedRowModel, useReactTable, type PaginationState, type SortingState } from '@tanstack/react-table';
import { INVOICE_KIND_LABELS, INVOICE_STATUS_LABELS, type InvoiceKind, type InvoiceStatus } from '../../../lib/billing/invoice';
import { formatDate, formatMoney, type CurrencyCode } from '../../../lib/format';
import { api } from '../ui/api';
import { InvoiceStatusPill } from './InvoiceStatusPill';
import { SortableTable } from './SortableTable';

export interface InvoiceRowView {
  id: number;
  numberText: string | null;
  kind: InvoiceKind;
  displayStatus: InvoiceStatus | 'overdue';
  sentAt: string | null;
  jobId: number;
  jobCode: string;
  jobTitle: string;
  customerName: string;
  issuedOn: string | null;
  dueOn: string | null;
  totalCents: number;
  balanceCents: number;
}

const FILTERS = ['draft', 'issued', 'partly_paid', 'overdue', 'paid', 'void'] as const;
const col = createColumnHelper<InvoiceRowView>();

/** Every invoice of the company: filter by state, search, sort by any column. */
export default function InvoicesTable({ initial, currency }: { initial: InvoiceRowView[]; currency: CurrencyCode }) {
  const [rows, setRows] = useState(initial);
  const [status, setStatus] = useState<string[]>([]);
  const [q, setQ] = useState('');
  const [sorting, setSorting] = useState<SortingState>([]);
  const [loading, setLoading] = useState(false);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 50 });
  const first = useRef(true);

  useEffect(() => {
    if (first.current) { first.current = false; return; }
    const ctrl = new AbortController();
    const t = setTimeout(() => {
      const p = new URLSearchParams();
      if (status.length) p.set('status', status.join(','));
      if (q.trim()) p.set('q', q.trim());
      setLoading(true);
      api<{ items: InvoiceRowView[] }>(`/api/invoices?${p}`, { signal: ctrl.signal }).then((r) => { if (r.ok) { setRows(r.data.items); setPagination((pg) => ({ ...pg, pageIndex: 0 })); } setLoading(false); }).catch(() => {});
    }, 200);
    return () => { clearTimeout(t); ctrl.abort(); };
  }, [status, q]);

  const m = (c: number) => formatMoney(c, currency);
  const columns = useMemo(() => [
    col.accessor((r) => r.numberText ?? '', { id: 'number', header: 'Invoice', cell: (c) => <a className="whitespace-nowrap font-semibold" href={`/invoices/${c.row.original.id}`}>{c.row.original.numberText ?? 'Draft'}</a> }),
    col.accessor('jobCode', { header: 'Job', cell: (c) => <a href={`/jobs/${c.row.original.jobId}`} className="whitespace-nowrap">{c.getValue()}</a> }),
    col.accessor('customerName', { header: 'Customer' }),
    col.accessor('kind', { header: 'Kind', cell: (c) => INVOICE_KIND_LABELS[c.getValue()] }),
    col.accessor('displayStatus', { header: 'State', cell: (c) => <InvoiceStatusPill status={c.getValue()} sent={Boolean(c.row.original.sentAt)} /> }),
    col.accessor('issuedOn', { header: 'Issued', cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
    col.accessor('dueOn', { header: 'Due', cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
    col.accessor('totalCents', { header: 'Total', cell: (c) => <span className="block text-right">{m(c.getValue())}</span> }),
    col.accessor('balanceCents', { header: 'Balance', cell: (c) => <span className="block text-right font-medium">{m(c.getValue())}</span> }),
  ], [currency]);
  const table = useReactTable({
    data: rows, columns, state: { sorting, pagination }, onSortingChange: setSorting, onPaginationChange: setPagination,
    getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel(), getPaginationRowModel: getPaginationRowModel(),
  });
  const toggle = (s: string) => setStatus((cur) => (cur.includes(s) ? cur.filter((x) => x !== s) : [...cur, s]));
  const total = rows.reduce((a, r) => a + r.balanceCents, 0);

  return (
    <div className="space-y-3" data-testid="invoices-table">
      <div className="flex flex-wrap items-end gap-3">
        <label className="min-w-[14rem] flex-1">
          <span className="label">Search</span>
          <input className="input" type="search" placeholder="Invoice number, job, customer" value={q} onChange={(e) => setQ(e.target.value)} />
        </label>
      </div>
      <fieldset className="flex flex-wrap gap-2">
        <legend className="label">State</legend>
        {FILTERS.map((s) => (
          <label key={s} className={`cursor-pointer rounded-full border px-3 py-1 text-xs ${status.includes(s) ? 'border-timber-600 bg-timber-100 font-semibold text-timber-800' : 'border-galv-300 bg-white text-galv-700'}`}>
            <input type="checkbox" className="sr-only" checked={status.includes(s)} onChange={() => toggle(s)} />
            {status.includes(s) ? '✓ ' : ''}{s === 'issued' ? 'Issued, unpaid' : INVOICE_STATUS_LABELS[s]}
          </label>
        ))}
      </fieldset>
      <ul className={`space-y-2 sm:hidden ${loading ? 'opacity-60' : ''}`} aria-label="Invoices">
        {table.getRowModel().rows.map(({ original: r }) => (
          <li key={r.id} className="card p-3">
            <div className="flex items-center justify-between gap-2"><a href={`/invoices/${r.id}`} className="font-semibold">{r.numberText ?? 'Draft'}</a><InvoiceStatusPill status={r.displayStatus} sent={Boolean(r.sentAt)} /></div>
            <p className="text-sm">{r.customerName} · {r.jobCode}</p>
            <p className="text-xs text-galv-600">Due {formatDate(r.dueOn)} · balance {m(r.balanceCents)}</p>
          </li>
        ))}
      </ul>
      <div className="hidden overflow-x-auto rounded-lg border border-galv-200 bg-white sm:block">
        <SortableTable table={table} loading={loading} empty="No invoices match." />
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2 text-sm">
        <span data-testid="invoices-total">{rows.length} invoice{rows.length === 1 ? '' : 's'} · balance {m(total)}</span>
        <div className="flex items-center gap-2">
          <button type="button" className="btn-secondary" disabled={!table.getCanPreviousPage()} onClick={() => table.previousPage()}>Previous</button>
          <span>Page {pagination.pageIndex + 1} of {Math.max(1, table.getPageCount())}</span>
          <button type="button" className="btn-secondary" disabled={!table.getCanNextPage()} onClick={() => table.nextPage()}>Next</button>
        </div>
      </div>
    </div>
  );
}
