import { useEffect, useRef, useState } from 'react';
import { api } from '../ui/api';
import { filterParams } from '../../../lib/reports/filters';

export interface Filter {
  from?: string;
  to?: string;
  style: number[];
  estimator: string[];
  status: string[];
}
export interface FilterOptions {
  styles: { id: number; name: string }[];
  estimators: { id: string; name: string }[];
}

/**
 * The report's data for the filter on screen: refetched when the filter changes (from one
 * endpoint or several, their answers merged), the address bar kept in step so a reload or a
 * shared link shows the same view.
 */
export function useReport<T>(paths: string | string[], initialFilter: Filter, initial: T) {
  const [filter, setFilter] = useState<Filter>(initialFilter);
  const [data, setData] = useState<T>(initial);
  const [error, setError] = useState<string | null>(null);
  const [loading, setLoading] = useState(false);
  const first = useRef(true);
  const query = filterParams(filter).toString();
  useEffect(() => {
    if (first.current) { first.current = false; return; }
    window.history.replaceState(null, '', `${window.location.pathname}${query ? `?${query}` : ''}`);
    const ctrl = new AbortController();
    setLoading(true);
    Promise.all((Array.isArray(paths) ? paths : [paths]).map((p) => api<Partial<T>>(`${p}?${query}`, { signal: ctrl.signal }))).then((rs) => {
      const bad = rs.find((r) => !r.ok);
      if (bad && !bad.ok) setError(bad.error.fields ? Object.values(bad.error.fields).join(' ') : bad.error.message);
      // What an answer leaves out (the filter choices, sent with the first view) stays as it was.
      else { setData((prev) => Object.assign({}, prev, ...rs.map((r) => (r.ok ? r.data : {}))) as T); setError(null); }
      setLoading(false);
    }).catch(() => {});
    return () => ctrl.abort();
  }, [query]);
  return { filter, setFilter, data, error, loading, query };
}

function Choices<V extends string | number>({ legend, options, chosen, onChange }: { legend: string; options: { id: V; name: string }[]; chosen: V[]; onChange: (v: V[]) => void }) {
  return (
    <details className="relative">
      <summary className="input cursor-pointer list-none pr-8" aria-label={`${legend}: ${chosen.length ? `${chosen.length} chosen` : 'all'}`}>
        {legend}: {chosen.length ? options.filter((o) => chosen.includes(o.id)).map((o) => o.name).join(', ') : 'all'}
        <span aria-hidden="true" className="absolute right-3 text-galv-500">▾</span>
      </summary>
      <fieldset className="absolute z-20 mt-1 max-h-72 w-72 overflow-auto rounded-md border border-galv-200 bg-white p-2 shadow-lg">
        <legend className="sr-only">{legend}</legend>
        {options.map((o) => (
          <label key={String(o.id)} className="flex items-center gap-2 rounded px-2 py-1 text-sm hover:bg-timber-50">
            <input type="checkbox" checked={chosen.includes(o.id)} onChange={(e) => onChange(e.target.checked ? [...chosen, o.id] : chosen.filter((x) => x !== o.id))} />
            {o.name}
          </label>
        ))}
        {options.length === 0 && <p className="px-2 py-1 text-sm text-galv-500">None yet.</p>}
      </fieldset>
    </details>
  );
}

/** Date range, styles, estimators and statuses: the filters every report takes. */
export function FilterBar({ filter, setFilter, options, statuses, defaultStatus, exportHref, loading, error }: {
  filter: Filter;
  setFilter: (f: Filter) => void;
  options: FilterOptions;
  statuses: { id: string; name: string }[];
  defaultStatus: string[];
  exportHref?: string;
  loading?: boolean;
  error?: string | null;
}) {
  const changed = filter.from || filter.to || filter.style.length || filter.estimator.length || filter.status.join() !== defaultStatus.join();
  return (
    <section aria-label="Filters" className="card space-y-2" data-testid="report-filters">
      <div className="grid grid-cols-2 gap-3 lg:grid-cols-6">
        <label><span className="label">From</span><input className="input" type="date" value={filter.from ?? ''} onChange={(e) => setFilter({ ...filter, from: e.target.value || undefined })} /></label>
        <label><span className="label">To</span><input className="input" type="date" value={filter.to ?? ''} onChange={(e) => setFilter({ ...filter, to: e.target.value || undefined })} /></label>
        <div className="col-span-2"><span className="label">Fence style</span><Choices legend="Styles" options={options.styles} chosen={filter.style} onChange={(style) => setFilter({ ...filter, style })} /></div>
        <div className="col-span-2"><span className="label">Estimator</span><Choices legend="Estimators" options={options.estimators} chosen={filter.estimator} onChange={(estimator) => setFilter({ ...filter, estimator })} /></div>
      </div>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <fieldset className="flex flex-wrap items-center gap-3">
          <legend className="sr-only">Job status</legend>
          <span className="text-sm font-medium text-galv-800" aria-hidden="true">Status:</span>
          {statuses.map((s) => (
            <label key={s.id} className="flex items-center gap-1 text-sm">
              <input type="checkbox" checked={filter.status.includes(s.id)} onChange={(e) => {
                const next = e.target.checked ? [...filter.status, s.id] : filter.status.filter((x) => x !== s.id);
                if (!next.length) return;
                setFilter({ ...filter, status: statuses.map((x) => x.id).filter((x) => next.includes(x)) });
              }} />
              {s.name}
            </label>
          ))}
        </fieldset>
        {changed ? <button type="button" className="btn-secondary" onClick={() => setFilter({ style: [], estimator: [], status: defaultStatus })}>Clear filters</button> : null}
        <span className="text-sm text-galv-500" aria-live="polite">{loading ? 'Updating…' : ''}</span>
        {exportHref && <a className="btn-secondary ml-auto" href={exportHref} download>Export CSV</a>}
      </div>
      {error && <p className="field-error" role="alert">{error}</p>}
    </section>
  );
}
