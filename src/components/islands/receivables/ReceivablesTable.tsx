import { useEffect, useMemo, useRef, useState } from 'react';
import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { AGING_BUCKETS, AGING_LABELS, type AgingBucket, type BucketTotals } from '../../../lib/aging';
import { formatDate, formatMoney, type CurrencyCode } from '../../../lib/format';
import { api } from '../ui/api';
import { SortableTable } from '../invoices/SortableTable';

export interface ReceivableRow {
  id: number; numberText: string; jobId: number; jobCode: string; customerId: number; customerName: string; issuedOn: string; dueOn: string;
  daysOutstanding: number; daysPastDue: number; bucket: AgingBucket; totalCents: number; paidCents: number; balanceCents: number;
}
export interface ReceivablesData { items: ReceivableRow[]; totals: BucketTotals; customers: ({ customerId: number; customerName: string } & BucketTotals)[]; currency: CurrencyCode; today: string }

const col = createColumnHelper<ReceivableRow>();
const TONE: Record<AgingBucket, string> = { current: 'bg-moss-100 text-moss-700', d1_30: 'bg-timber-100 text-timber-800', d31_60: 'bg-timber-200 text-timber-900', d61_90: 'bg-rust-100 text-rust-700', over_90: 'bg-rust-600 text-white' };

/** Every open invoice with its age; bucket and customer filters, sorting, and the same view as CSV. */
export default function ReceivablesTable({ initial }: { initial: ReceivablesData }) {
  const [data, setData] = useState(initial);
  const [buckets, setBuckets] = useState<AgingBucket[]>([]);
  const [customer, setCustomer] = useState<number | ''>('');
  const [sorting, setSorting] = useState<SortingState>([{ id: 'daysPastDue', desc: true }]);
  const [loading, setLoading] = useState(false);
  const first = useRef(true);
  const allCustomers = useMemo(() => initial.customers.map((c) => ({ id: c.customerId, name: c.customerName })).sort((a, b) => a.name.localeCompare(b.name)), [initial]);
  const params = new URLSearchParams();
  if (buckets.length) params.set('bucket', buckets.join(','));
  if (customer) params.set('customer', String(customer));

  useEffect(() => {
    if (first.current) { first.current = false; return; }
    const ctrl = new AbortController();
    setLoading(true);
    api<ReceivablesData>(`/api/receivables?${params}`, { signal: ctrl.signal }).then((r) => { if (r.ok) setData(r.data); setLoading(false); }).catch(() => {});
    return () => ctrl.abort();
  }, [buckets.join(','), customer]);

  const m = (c: number) => formatMoney(c, data.currency);
  const columns = useMemo(() => [
    col.accessor('numberText', { header: 'Invoice', cell: (c) => <a className="whitespace-nowrap font-semibold" href={`/invoices/${c.row.original.id}`}>{c.getValue()}</a> }),
    col.accessor('customerName', { header: 'Customer' }),
    col.accessor('jobCode', { header: 'Job', cell: (c) => <a href={`/jobs/${c.row.original.jobId}`}>{c.getValue()}</a> }),
    col.accessor('dueOn', { header: 'Due', cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
    col.accessor('daysOutstanding', { header: 'Days out', cell: (c) => <span className="block text-right">{c.getValue()}</span> }),
    col.accessor('daysPastDue', { header: 'Days past due', cell: (c) => <span className="block text-right">{Math.max(0, c.getValue())}</span> }),
    col.accessor('bucket', { header: 'Aging', sortingFn: (a, b) => AGING_BUCKETS.indexOf(a.original.bucket) - AGING_BUCKETS.indexOf(b.original.bucket), cell: (c) => <span className={`pill ${TONE[c.getValue()]}`}>{AGING_LABELS[c.getValue()]}</span> }),
    col.accessor('balanceCents', { header: 'Balance', cell: (c) => <span className="block text-right font-medium">{m(c.getValue())}</span> }),
  ], [data.currency]);
  const table = useReactTable({ data: data.items, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  const toggle = (b: AgingBucket) => setBuckets((cur) => (cur.includes(b) ? cur.filter((x) => x !== b) : [...cur, b]));

  return (
    <div className="space-y-4" data-testid="receivables">
      <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6" aria-label="Totals by aging bucket">
        {AGING_BUCKETS.map((b) => (
          <li key={b} className="card p-3">
            <button type="button" className="block w-full text-left" onClick={() => toggle(b)} aria-pressed={buckets.includes(b)}>
              <span className="block text-xs text-galv-500">{AGING_LABELS[b]}{buckets.includes(b) ? ' ✓' : ''}</span>
              <span className="text-lg font-semibold" data-testid={`bucket-${b}`}>{m(data.totals[b])}</span>
            </button>
          </li>
        ))}
        <li className="card p-3"><span className="block text-xs text-galv-500">All open</span><span className="text-lg font-semibold" data-testid="receivables-total">{m(data.totals.total)}</span></li>
      </ul>
      <div className="flex flex-wrap items-end gap-3">
        <label>
          <span className="label">Customer</span>
          <select className="input" value={customer} onChange={(e) => setCustomer(e.target.value ? Number(e.target.value) : '')}>
            <option value="">All customers</option>
            {allCustomers.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
          </select>
        </label>
        {(buckets.length > 0 || customer) && <button type="button" className="btn-secondary" onClick={() => { setBuckets([]); setCustomer(''); }}>Clear filters</button>}
        <a className="btn-secondary ml-auto" href={`/api/receivables?${new URLSearchParams([...params, ['format', 'csv']])}`} download>Export CSV</a>
      </div>
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <SortableTable table={table} loading={loading} empty="Nothing open here." footer={<tfoot><tr><td colSpan={columns.length - 1} className="px-3 py-2 text-right font-semibold">{data.items.length} open · total</td><td className="px-3 py-2 text-right font-semibold">{m(data.totals.total)}</td></tr></tfoot>} />
      </div>
      <section aria-labelledby="by-customer">
        <h2 id="by-customer" className="mb-2">By customer</h2>
        <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
          <table className="table-dense">
            <thead><tr><th>Customer</th>{AGING_BUCKETS.map((b) => <th key={b} className="num">{AGING_LABELS[b]}</th>)}<th className="num">Total</th></tr></thead>
            <tbody>
              {data.customers.map((c) => <tr key={c.customerId}><td>{c.customerName}</td>{AGING_BUCKETS.map((b) => <td key={b} className="num">{c[b] ? m(c[b]) : '—'}</td>)}<td className="num font-semibold">{m(c.total)}</td></tr>)}
            </tbody>
          </table>
        </div>
      </section>
    </div>
  );
}
