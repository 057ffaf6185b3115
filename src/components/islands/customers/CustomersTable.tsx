import { useEffect, useRef, useState } from 'react';
import type { Customer } from '../../../lib/customers/schema';
import { api } from '../ui/api';

/** Customers with a server-side search and pages. */
export default function CustomersTable({ initial, pageSize }: { initial: { items: Customer[]; total: number }; pageSize: number }) {
  const [data, setData] = useState(initial);
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  const first = useRef(true);

  useEffect(() => {
    if (first.current) { first.current = false; return; }
    const ctrl = new AbortController();
    const t = setTimeout(() => {
      const params = new URLSearchParams({ page: String(page), pageSize: String(pageSize) });
      if (q) params.set('q', q);
      api<{ items: Customer[]; total: number }>(`/api/customers?${params}`, { signal: ctrl.signal }).then((r) => r.ok && setData(r.data)).catch(() => {});
    }, 200);
    return () => { clearTimeout(t); ctrl.abort(); };
  }, [q, page, pageSize]);

  const pages = Math.max(1, Math.ceil(data.total / pageSize));
  return (
    <div className="space-y-3">
      <label className="block max-w-md">
        <span className="label">Search</span>
        <input className="input" type="search" value={q} placeholder="Name, e-mail, phone or town" onChange={(e) => { setQ(e.target.value); setPage(1); }} />
      </label>
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead><tr><th>Name</th><th>E-mail</th><th>Phone</th><th>Town</th><th className="num">Jobs</th></tr></thead>
          <tbody>
            {data.items.map((c) => (
              <tr key={c.id}>
                <td><a href={`/customers/${c.id}`} className="font-medium">{c.name}</a></td>
                <td>{c.email ?? '—'}</td>
                <td>{c.phone ?? '—'}</td>
                <td>{c.billingCity ?? c.siteCity ?? '—'}</td>
                <td className="num">{c.jobCount ?? 0}</td>
              </tr>
            ))}
            {data.items.length === 0 && <tr><td colSpan={5} className="py-6 text-center text-galv-500">No customers match.</td></tr>}
          </tbody>
        </table>
      </div>
      <div className="flex items-center justify-between text-sm">
        <span>{data.total} customer{data.total === 1 ? '' : 's'}</span>
        <div className="flex items-center gap-2">
          <button type="button" className="btn-secondary" disabled={page <= 1} onClick={() => setPage(page - 1)}>Previous</button>
          <span>Page {page} of {pages}</span>
          <button type="button" className="btn-secondary" disabled={page >= pages} onClick={() => setPage(page + 1)}>Next</button>
        </div>
      </div>
    </div>
  );
}
