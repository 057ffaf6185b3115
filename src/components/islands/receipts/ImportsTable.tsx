import { useMemo, useState } from 'react';
import { formatDate } from '../../../lib/format';
import type { ImportListItem } from '../../../lib/csv/imports';
import { Money, SortHeader } from '../costs/ui';


type Sort = 'uploadedAt' | 'fileName' | 'supplierName' | 'lines' | 'amountCents' | 'unmatched' | 'hours';

/** The company's imports, newest first; sorts and filters in the browser (at most 500 rows). */
export default function ImportsTable({ rows, pageBase, kind = 'receipts' }: { rows: ImportListItem[]; pageBase: string; kind?: 'receipts' | 'timesheet' }) {
  const receipts = kind === 'receipts';
  const [sort, setSort] = useState<Sort>('uploadedAt');
  const [dir, setDir] = useState<'asc' | 'desc'>('desc');
  const [status, setStatus] = useState<'all' | 'preview' | 'committed' | 'unmatched'>('all');
  const [q, setQ] = useState('');
  const [all, setAll] = useState(false);
  const onSort = (c: Sort) => { if (c === sort) setDir(dir === 'asc' ? 'desc' : 'asc'); else { setSort(c); setDir(c === 'fileName' || c === 'supplierName' ? 'asc' : 'desc'); } };
  const shown = useMemo(() => {
    const needle = q.trim().toLowerCase();
    const list = rows.filter((r) =>
      (status === 'all' || (status === 'unmatched' ? r.unmatched > 0 : r.status === status)) &&
      (!needle || `${r.fileName} ${r.supplierName ?? ''} #${r.id}`.toLowerCase().includes(needle)));
    const sign = dir === 'asc' ? 1 : -1;
    return [...list].sort((a, b) => {
      const x = a[sort] ?? '';
      const y = b[sort] ?? '';
      return (x < y ? -1 : x > y ? 1 : a.id - b.id) * sign;
    });
  }, [rows, sort, dir, status, q]);
  const total = shown.reduce((a, r) => a + r.amountCents, 0);

  return (
    <div className="space-y-3" data-testid="imports-table">
      <div className="flex flex-wrap items-end gap-3">
        <label>
          <span className="label">Show</span>
          <select className="input" value={status} onChange={(e) => setStatus(e.target.value as typeof status)}>
            <option value="all">All imports</option>
            <option value="preview">Waiting to be committed</option>
            <option value="committed">Committed</option>
            {receipts && <option value="unmatched">With unmatched lines</option>}
          </select>
        </label>
        <label className="min-w-[12rem] flex-1">
          <span className="label">Search</span>
          <input className="input" type="search" value={q} placeholder={receipts ? 'File or supplier' : 'File'} onChange={(e) => setQ(e.target.value)} />
        </label>
      </div>
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead>
            <tr>
              <th className="num">#</th>
              <SortHeader label="Uploaded" col="uploadedAt" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="File" col="fileName" sort={sort} dir={dir} onSort={onSort} />
              {receipts && <SortHeader label="Supplier" col="supplierName" sort={sort} dir={dir} onSort={onSort} />}
              <th>State</th>
              <SortHeader label={receipts ? 'Lines' : 'Rows'} col="lines" sort={sort} dir={dir} onSort={onSort} className="num" />
              {receipts ? <SortHeader label="Unmatched" col="unmatched" sort={sort} dir={dir} onSort={onSort} className="num" /> : <SortHeader label="Hours" col="hours" sort={sort} dir={dir} onSort={onSort} className="num" />}
              {receipts && <SortHeader label="Amount" col="amountCents" sort={sort} dir={dir} onSort={onSort} className="num" />}
            </tr>
          </thead>
          <tbody>
            {(all ? shown : shown.slice(0, 25)).map((r) => (
              <tr key={r.id}>
                <td className="num text-galv-500">{r.id}</td>
                <td className="whitespace-nowrap">{formatDate(r.uploadedAt)}<span className="block text-xs text-galv-500">{r.uploadedByName}</span></td>
                <td><a href={`${pageBase}/${r.id}`} className="font-medium">{r.fileName}</a></td>
                {receipts && <td>{r.supplierName ?? '—'}</td>}
                <td>{r.status === 'preview' ? <span className="pill bg-timber-100 text-timber-800">Waiting to commit</span> : <span className="pill bg-moss-100 text-moss-700">Committed</span>}
                  {r.errors > 0 && <span className="ml-1 pill bg-rust-100 text-rust-700">{r.errors} error{r.errors === 1 ? '' : 's'}</span>}
                  {r.duplicates > 0 && <span className="ml-1 pill bg-galv-100 text-galv-700">{r.duplicates} already in</span>}</td>
                <td className="num">{r.lines}</td>
                {receipts ? <td className="num">{r.unmatched ? <a href={`/receipts/allocate?importId=${r.id}`}>{r.unmatched}</a> : 0}</td> : <td className="num">{r.hours}</td>}
                {receipts && <td className="num"><Money cents={r.amountCents} /></td>}
              </tr>
            ))}
            {shown.length === 0 && <tr><td colSpan={8} className="py-6 text-center text-galv-500">No imports yet. Drop a {receipts ? 'supplier’s CSV' : 'timesheet'} above.</td></tr>}
          </tbody>
          {receipts && shown.length > 0 && <tfoot><tr><td colSpan={7} className="text-right font-medium">{shown.length} import{shown.length === 1 ? '' : 's'}</td><td className="num font-semibold"><Money cents={total} /></td></tr></tfoot>}
        </table>
      </div>
      {!all && shown.length > 25 && <button type="button" className="btn-secondary" onClick={() => setAll(true)}>Show all {shown.length} imports</button>}
    </div>
  );
}
