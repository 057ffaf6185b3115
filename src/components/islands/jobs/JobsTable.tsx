import { useEffect, useMemo, useRef, useState } from 'react';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { JOB_STATUSES, JOB_STATUS_LABELS, type JobRow, type JobStatus } from '../../../lib/jobs/schema';
import { formatDate, formatMoney } from '../../../lib/format';
import { api } from '../ui/api';
import { StatusPill } from '../ui/StatusPill';

interface Props {
  initial: { items: JobRow[]; total: number };
  styles: { id: number; name: string }[];
  showContract: boolean;
  initialQuery: { q: string; status: JobStatus[]; style: number[]; sort: string; dir: 'asc' | 'desc'; page: number; pageSize: number };
}

const col = createColumnHelper<JobRow>();
/** Column id → the API's sort key. */
const SORT_KEYS: Record<string, string> = { code: 'code', title: 'title', customerName: 'customer', styleName: 'style', status: 'status', leadDate: 'leadDate', contractCents: 'contract' };
const FROM_SORT_KEY = Object.fromEntries(Object.entries(SORT_KEYS).map(([k, v]) => [v, k]));

/** The jobs table: sorting, filters, search and paging all happen on the server. */
export default function JobsTable({ initial, styles, showContract, initialQuery }: Props) {
  const [data, setData] = useState(initial);
  const [q, setQ] = useState(initialQuery.q);
  const [search, setSearch] = useState(initialQuery.q);
  const [status, setStatus] = useState<JobStatus[]>(initialQuery.status);
  const [style, setStyle] = useState<number[]>(initialQuery.style);
  const [sorting, setSorting] = useState<SortingState>([{ id: FROM_SORT_KEY[initialQuery.sort] ?? 'code', desc: initialQuery.dir === 'desc' }]);
  const [page, setPage] = useState(initialQuery.page);
  const pageSize = initialQuery.pageSize;
  const [loading, setLoading] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const first = useRef(true);

  useEffect(() => {
    const t = setTimeout(() => { setSearch(q); setPage(1); }, 250);
    return () => clearTimeout(t);
  }, [q]);

  useEffect(() => {
    if (first.current) { first.current = false; return; }
    const params = new URLSearchParams();
    if (search) params.set('q', search);
    if (status.length) params.set('status', status.join(','));
    if (style.length) params.set('style', style.join(','));
    const s = sorting[0];
    params.set('sort', SORT_KEYS[s?.id ?? 'code'] ?? 'code');
    params.set('dir', s?.desc ? 'desc' : 'asc');
    params.set('page', String(page));
    params.set('pageSize', String(pageSize));
    const ctrl = new AbortController();
    setLoading(true);
    api<{ items: JobRow[]; total: number }>(`/api/jobs?${params}`, { signal: ctrl.signal })
      .then((r) => {
        if (r.ok) { setData(r.data); setError(null); }
        else setError(r.error.message);
        setLoading(false);
        window.history.replaceState(null, '', `/jobs?${params}`);
      })
      .catch(() => {});
    return () => ctrl.abort();
  }, [search, status, style, sorting, page, pageSize]);

  const columns = useMemo(() => {
    const cols = [
      col.accessor('code', { header: 'Job', cell: (c) => <a href={`/jobs/${c.row.original.id}`} className="whitespace-nowrap font-semibold">{c.getValue()}</a> }),
      col.accessor('title', { header: 'Title' }),
      col.accessor('customerName', { header: 'Customer' }),
      col.accessor('styleName', { header: 'Fence style', cell: (c) => c.getValue() ?? <span className="text-galv-400">—</span> }),
      col.accessor('status', { header: 'Status', cell: (c) => <StatusPill status={c.getValue()} /> }),
      col.accessor('leadDate', { header: 'Lead date', cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
    ];
    if (showContract) cols.push(col.accessor('contractCents', { header: 'Contract', cell: (c) => <span className="block text-right">{formatMoney(c.getValue())}</span> }) as never);
    return cols;
  }, [showContract]);

  const table = useReactTable({
    data: data.items,
    columns,
    state: { sorting },
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    onSortingChange: (u) => { setSorting(u); setPage(1); },
    getCoreRowModel: getCoreRowModel(),
    rowCount: data.total,
  });

  const pages = Math.max(1, Math.ceil(data.total / pageSize));
  const toggleStatus = (s: JobStatus) => { setStatus((cur) => (cur.includes(s) ? cur.filter((x) => x !== s) : [...cur, s])); setPage(1); };

  return (
    <div className="space-y-3" data-testid="jobs-table">
      <div className="flex flex-wrap items-end gap-3">
        <label className="min-w-[14rem] flex-1">
          <span className="label">Search</span>
          <input className="input" type="search" placeholder="Job code, title, customer, street or town" value={q} onChange={(e) => setQ(e.target.value)} />
        </label>
        <label>
          <span className="label">Fence style</span>
          <select className="input" value={style[0] ?? ''} onChange={(e) => { setStyle(e.target.value ? [Number(e.target.value)] : []); setPage(1); }}>
            <option value="">All styles</option>
            {styles.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </label>
      </div>
      <fieldset className="flex flex-wrap gap-2">
        <legend className="label">Status</legend>
        {JOB_STATUSES.map((s) => (
          <label key={s} className={`cursor-pointer rounded-full border px-3 py-1 text-xs ${status.includes(s) ? 'border-timber-600 bg-timber-100 font-semibold text-timber-800' : 'border-galv-300 bg-white text-galv-700'}`}>
            <input type="checkbox" className="sr-only" checked={status.includes(s)} onChange={() => toggleStatus(s)} />
            {status.includes(s) ? '✓ ' : ''}{JOB_STATUS_LABELS[s]}
          </label>
        ))}
        {status.length > 0 && <button type="button" className="text-xs underline" onClick={() => { setStatus([]); setPage(1); }}>Clear</button>}
      </fieldset>
      {error && <p role="alert" className="field-error">{error}</p>}
      <ul className={`space-y-2 sm:hidden ${loading ? 'opacity-60' : ''}`} aria-label="Jobs">
        {data.items.map((j) => (
          <li key={j.id} className="card p-3">
            <div className="flex items-center justify-between gap-2">
              <a href={`/jobs/${j.id}`} className="font-semibold">{j.code}</a>
              <StatusPill status={j.status} />
            </div>
            <p className="text-sm font-medium">{j.title}</p>
            <p className="text-xs text-galv-600">{j.customerName}{j.styleName ? ` · ${j.styleName}` : ''} · {formatDate(j.leadDate)}</p>
          </li>
        ))}
        {data.items.length === 0 && <li className="card p-3 text-center text-galv-500">No jobs match. Clear a filter or the search.</li>}
      </ul>
      <div className="hidden overflow-x-auto rounded-lg border border-galv-200 bg-white sm:block">
        <table className="table-dense" aria-busy={loading}>
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}>
                      <button type="button" className="flex items-center gap-1" onClick={h.column.getToggleSortingHandler()}>
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden="true" className="text-galv-400">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className={loading ? 'opacity-60' : ''}>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id}>
                {row.getVisibleCells().map((cell) => <td key={cell.id}>{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>)}
              </tr>
            ))}
            {data.items.length === 0 && (
              <tr><td colSpan={columns.length} className="py-6 text-center text-galv-500">No jobs match. Clear a filter or the search.</td></tr>
            )}
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2 text-sm">
        <span data-testid="jobs-total">{data.total} job{data.total === 1 ? '' : 's'}</span>
        <div className="flex items-center gap-2">
          <button type="button" className="btn-secondary" disabled={page <= 1} onClick={() => setPage(page - 1)}>Previous</button>
          <span>Page {page} of {pages}</span>
          <button type="button" className="btn-secondary" disabled={page >= pages} onClick={() => setPage(page + 1)}>Next</button>
        </div>
      </div>
    </div>
  );
}
