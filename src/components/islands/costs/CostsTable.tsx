import { useEffect, useRef, useState } from 'react';
import { COST_CATEGORIES, COST_CATEGORY_LABELS, type CostCategory } from '../../../lib/costs/categories';
import { COST_KINDS, COST_KIND_LABELS, type CostKind, type CostRow, type CostTotals } from '../../../lib/costs/schema';
import { api } from '../ui/api';
import { JobSelect, Money, Pager, SortHeader, params, useDebounced, type JobOption } from './ui';

type Sort = 'date' | 'job' | 'category' | 'supplier' | 'amount' | 'description' | 'kind';

export interface CostFilters {
  job: number | '';
  category: CostCategory[];
  supplier: number | '';
  kind: CostKind[];
  from: string;
  to: string;
  unmatched: boolean;
  q: string;
}

interface Props {
  initial: { items: CostRow[]; total: number; totals: CostTotals };
  initialFilters: CostFilters;
  jobs: JobOption[];
  suppliers: { id: number; name: string }[];
  /** bump to reload after a cost is added elsewhere on the page */
  reloadKey?: number;
}

const PAGE = 50;

function Chip({ on, onClick, children }: { on: boolean; onClick: () => void; children: string }) {
  return (
    <button type="button" aria-pressed={on} onClick={onClick} className={`rounded-full border px-3 py-1 text-xs ${on ? 'border-timber-600 bg-timber-100 font-semibold text-timber-800' : 'border-galv-300 bg-white text-galv-700'}`}>{on ? '✓ ' : ''}{children}</button>
  );
}

function source(r: CostRow) {
  if (r.kind === 'receipt' && r.importId) return <a href={`/receipts/${r.importId}#row-${r.rowNumber}`}>Import #{r.importId}, row {r.rowNumber}</a>;
  if (r.kind === 'time') return <a href={`/time?job=${r.jobId}`}>Crew hours</a>;
  if (r.kind === 'rental') return <a href={`/time/rentals?job=${r.jobId}`}>Rental</a>;
  return COST_KIND_LABELS[r.kind];
}

/** Every actual cost line of the company, filtered on the server; the totals are of the filtered rows. */
export default function CostsTable({ initial, initialFilters, jobs, suppliers, reloadKey = 0 }: Props) {
  const [f, setF] = useState<CostFilters>(initialFilters);
  const q = useDebounced(f.q);
  const [sort, setSort] = useState<Sort>('date');
  const [dir, setDir] = useState<'asc' | 'desc'>('desc');
  const [page, setPage] = useState(1);
  const [data, setData] = useState(initial);
  const [loading, setLoading] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const first = useRef(true);

  const query = params({ job: f.job, category: f.category, supplier: f.supplier, kind: f.kind, from: f.from, to: f.to, unmatched: f.unmatched, q, sort, dir });
  const queryText = query.toString();

  useEffect(() => {
    if (first.current) { first.current = false; return; }
    const ctrl = new AbortController();
    setLoading(true);
    api<typeof initial>(`/api/costs?${queryText}&page=${page}&pageSize=${PAGE}`, { signal: ctrl.signal })
      .then((r) => { if (r.ok) { setData(r.data); setError(null); } else setError(r.error.message); setLoading(false); window.history.replaceState(null, '', `/costs?${queryText}`); })
      .catch(() => {});
    return () => ctrl.abort();
  }, [queryText, page, reloadKey]);

  const set = (p: Partial<CostFilters>) => { setF({ ...f, ...p }); setPage(1); };
  const toggle = <T,>(list: T[], v: T) => (list.includes(v) ? list.filter((x) => x !== v) : [...list, v]);
  const onSort = (c: Sort) => { if (c === sort) setDir(dir === 'asc' ? 'desc' : 'asc'); else { setSort(c); setDir(c === 'amount' || c === 'date' ? 'desc' : 'asc'); } setPage(1); };

  return (
    <div className="space-y-3" data-testid="costs-table">
      <div className="grid grid-cols-2 gap-3 lg:grid-cols-5">
        <label className="col-span-2 sm:col-span-1"><span className="label">Job</span><JobSelect jobs={jobs} value={f.job} onChange={(v) => set({ job: v })} empty="All jobs" /></label>
        <label className="col-span-2 sm:col-span-1"><span className="label">Supplier</span>
          <select className="input" value={f.supplier} onChange={(e) => set({ supplier: e.target.value ? Number(e.target.value) : '' })}>
            <option value="">All suppliers</option>
            {suppliers.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </label>
        <label><span className="label">From</span><input className="input" type="date" value={f.from} onChange={(e) => set({ from: e.target.value })} /></label>
        <label><span className="label">To</span><input className="input" type="date" value={f.to} onChange={(e) => set({ to: e.target.value })} /></label>
        <label className="col-span-2 lg:col-span-1"><span className="label">Search</span><input className="input" type="search" value={f.q} placeholder="Description, job, supplier" onChange={(e) => set({ q: e.target.value })} /></label>
      </div>
      <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Category">
        {COST_CATEGORIES.map((c) => <Chip key={c} on={f.category.includes(c)} onClick={() => set({ category: toggle(f.category, c) })}>{COST_CATEGORY_LABELS[c]}</Chip>)}
        <span className="mx-1 text-galv-300">|</span>
        {COST_KINDS.map((k) => <Chip key={k} on={f.kind.includes(k)} onClick={() => set({ kind: toggle(f.kind, k) })}>{COST_KIND_LABELS[k]}</Chip>)}
        <span className="mx-1 text-galv-300">|</span>
        <Chip on={f.unmatched} onClick={() => set({ unmatched: !f.unmatched })}>Unmatched only</Chip>
      </div>
      {error && <p role="alert" className="field-error">{error}</p>}
      <div className="flex flex-wrap items-center justify-between gap-2 rounded-md bg-white px-3 py-2 text-sm shadow-sm" aria-live="polite">
        <span data-testid="costs-total"><strong>{data.totals.count}</strong> line{data.totals.count === 1 ? '' : 's'} · total <strong><Money cents={data.totals.amountCents} /></strong></span>
        <span className="text-xs text-galv-600">{COST_CATEGORIES.filter((c) => data.totals.byCategory[c]).map((c) => `${COST_CATEGORY_LABELS[c]} ${new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' }).format((data.totals.byCategory[c] ?? 0) / 100)}`).join(' · ')}</span>
        <a className="btn-secondary px-2 py-1 text-xs" href={`/api/costs/export?${queryText}`} download>Export CSV</a>
      </div>
      <ul className={`space-y-2 sm:hidden ${loading ? 'opacity-60' : ''}`} aria-label="Cost lines">
        {data.items.map((r) => (
          <li key={`${r.kind}-${r.id}`} className="card p-3 text-sm">
            <div className="flex justify-between gap-2"><span className="font-medium">{r.description ?? '—'}</span><Money cents={r.amountCents} className="font-semibold" /></div>
            <p className="text-xs text-galv-600">{r.date} · {r.jobCode ?? (r.overhead ? 'Overhead' : 'Unmatched')} · {COST_CATEGORY_LABELS[r.category]}{r.supplierName ? ` · ${r.supplierName}` : ''} · {source(r)}</p>
          </li>
        ))}
        {data.items.length === 0 && <li className="card p-3 text-center text-galv-500">No cost lines match. Clear a filter.</li>}
      </ul>
      <div className="hidden overflow-x-auto rounded-lg border border-galv-200 bg-white sm:block">
        <table className="table-dense" aria-busy={loading}>
          <thead>
            <tr>
              <SortHeader label="Date" col="date" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Job" col="job" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Category" col="category" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Description" col="description" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Supplier" col="supplier" sort={sort} dir={dir} onSort={onSort} />
              <th className="num">Qty</th>
              <SortHeader label="Amount" col="amount" sort={sort} dir={dir} onSort={onSort} className="num" />
              <SortHeader label="From" col="kind" sort={sort} dir={dir} onSort={onSort} />
            </tr>
          </thead>
          <tbody className={loading ? 'opacity-60' : ''}>
            {data.items.map((r) => (
              <tr key={`${r.kind}-${r.id}`}>
                <td className="whitespace-nowrap">{r.date}</td>
                <td className="whitespace-nowrap">{r.jobId ? <a href={`/jobs/${r.jobId}`}>{r.jobCode}</a> : r.overhead ? <span className="text-galv-600">Overhead</span> : <a href={`/receipts/allocate?importId=${r.importId ?? ''}`} className="text-timber-800">Unmatched</a>}</td>
                <td>{COST_CATEGORY_LABELS[r.category]}</td>
                <td className="min-w-[12rem]">{r.description ?? '—'}</td>
                <td>{r.supplierName ?? '—'}</td>
                <td className="num whitespace-nowrap">{r.quantity ? `${r.quantity} ${r.unit ?? ''}` : ''}</td>
                <td className="num"><Money cents={r.amountCents} /></td>
                <td className="whitespace-nowrap text-xs">{source(r)}</td>
              </tr>
            ))}
            {data.items.length === 0 && <tr><td colSpan={8} className="py-6 text-center text-galv-500">No cost lines match. Clear a filter.</td></tr>}
          </tbody>
        </table>
      </div>
      <Pager page={page} pageSize={PAGE} total={data.total} noun={['line', 'lines']} onPage={setPage} />
    </div>
  );
}
