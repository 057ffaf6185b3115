import { useEffect, useState, type ReactNode } from 'react';
import { api } from '../ui/api';
import { COST_CATEGORIES, COST_CATEGORY_LABELS, type CostCategory } from '../../../lib/costs/categories';
import { formatMoney } from '../../../lib/format';

// Small pieces the cost, receipt and time islands share.

export interface JobOption {
  id: number;
  code: string;
  title: string;
}

export function Money({ cents, className = '' }: { cents: number | null | undefined; className?: string }) {
  const negative = (cents ?? 0) < 0;
  return <span className={`whitespace-nowrap tabular-nums ${negative ? 'text-moss-700' : ''} ${className}`}>{formatMoney(cents)}</span>;
}

export function SortHeader<K extends string>({ label, col, sort, dir, onSort, className = '' }: { label: string; col: K; sort: K; dir: 'asc' | 'desc'; onSort: (col: K) => void; className?: string }) {
  const active = sort === col;
  return (
    <th aria-sort={active ? (dir === 'asc' ? 'ascending' : 'descending') : 'none'} className={className}>
      <button type="button" className="flex items-center gap-1" onClick={() => onSort(col)}>
        {label}
        <span aria-hidden="true" className="text-galv-400">{active ? (dir === 'asc' ? '▲' : '▼') : '↕'}</span>
      </button>
    </th>
  );
}

export function Pager({ page, pageSize, total, noun, onPage }: { page: number; pageSize: number; total: number; noun: [string, string]; onPage: (p: number) => void }) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  return (
    <div className="flex flex-wrap items-center justify-between gap-2 text-sm">
      <span>{total} {total === 1 ? noun[0] : noun[1]}</span>
      <div className="flex items-center gap-2">
        <button type="button" className="btn-secondary" disabled={page <= 1} onClick={() => onPage(page - 1)}>Previous</button>
        <span>Page {page} of {pages}</span>
        <button type="button" className="btn-secondary" disabled={page >= pages} onClick={() => onPage(page + 1)}>Next</button>
      </div>
    </div>
  );
}

export function CategorySelect({ value, onChange, id, label = 'Category', className = 'input' }: { value: CostCategory; onChange: (c: CostCategory) => void; id?: string; label?: string; className?: string }) {
  return (
    <select id={id} aria-label={id ? undefined : label} className={className} value={value} onChange={(e) => onChange(e.target.value as CostCategory)}>
      {COST_CATEGORIES.map((c) => <option key={c} value={c}>{COST_CATEGORY_LABELS[c]}</option>)}
    </select>
  );
}

export function JobSelect({ jobs, value, onChange, id, label = 'Job', empty = 'Choose a job', className = 'input' }: { jobs: JobOption[]; value: number | ''; onChange: (v: number | '') => void; id?: string; label?: string; empty?: string; className?: string }) {
  return (
    <select id={id} aria-label={id ? undefined : label} className={className} value={value} onChange={(e) => onChange(e.target.value ? Number(e.target.value) : '')}>
      <option value="">{empty}</option>
      {jobs.map((j) => <option key={j.id} value={j.id}>{j.code} · {j.title}</option>)}
    </select>
  );
}

export function Notice({ tone = 'ok', children }: { tone?: 'ok' | 'warn'; children: ReactNode }) {
  return (
    <p role="status" className={`rounded-md px-3 py-2 text-sm ${tone === 'ok' ? 'bg-moss-100 text-moss-700' : 'bg-timber-100 text-timber-900'}`}>{children}</p>
  );
}

/** A value that settles after the user stops typing. */
export function useDebounced<T>(value: T, ms = 250): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}

/** Query-string parameters from an object, leaving out empty values. */
export function params(values: Record<string, string | number | boolean | null | undefined | (string | number)[]>): URLSearchParams {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(values)) {
    if (v === null || v === undefined || v === '' || v === false) continue;
    if (Array.isArray(v)) { if (v.length) p.set(k, v.join(',')); continue; }
    p.set(k, v === true ? '1' : String(v));
  }
  return p;
}

/**
 * A list the page rendered first and the island reloads when its filters, page or `tick`
 * change (the first render keeps the server's rows).
 */
export function useReloadingList<T>(initial: T, url: string, tick: number): [T, (t: T) => void] {
  const [list, setList] = useState(initial);
  const [first, setFirst] = useState(url);
  useEffect(() => {
    if (tick === 0 && url === first) return;
    setFirst('');
    const ctrl = new AbortController();
    api<T>(url, { signal: ctrl.signal }).then((r) => r.ok && setList(r.data)).catch(() => {});
    return () => ctrl.abort();
  }, [url, tick]);
  return [list, setList];
}
