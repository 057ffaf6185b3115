import { Fragment, useEffect, useState } from 'react';
import type { CostCategory } from '../../../lib/costs/categories';
import { COST_CATEGORY_LABELS } from '../../../lib/costs/categories';
import type { ImportLine } from '../../../lib/csv/imports';
import { splitByAmount, splitByPercent } from '../../../lib/allocation/split';
import { parseMoney, toCents } from '../../../lib/csv/numbers';
import { formatMoney } from '../../../lib/format';
import { api } from '../ui/api';
import { CategorySelect, JobSelect, Money, Notice, Pager, SortHeader, params, useDebounced, type JobOption } from '../costs/ui';

type Allocation = 'unmatched' | 'job' | 'split' | 'overhead' | 'all';
type Sort = 'date' | 'amount' | 'supplier' | 'description';

interface Props {
  jobs: JobOption[];
  suppliers: { id: number; name: string }[];
  importId?: number | null;
  initialAllocation?: Allocation;
}

interface Part { jobId: number | ''; overhead: boolean; category: CostCategory; value: string }

const PAGE = 50;
const ALLOCATIONS: [Allocation, string][] = [['unmatched', 'Waiting for a job'], ['job', 'On a job'], ['split', 'Split'], ['overhead', 'Overhead'], ['all', 'All lines']];

function describeParts(l: ImportLine): string {
  if (!l.parts?.length) return '—';
  return l.parts.map((p) => `${p.jobCode ?? (p.overhead ? 'Overhead' : 'Unmatched')} ${formatMoney(p.amountCents)}`).join(' + ');
}

/** Receipt lines that matched no job: allocate each to a job and category, split it, or book it as overhead. */
export default function AllocationTable({ jobs, suppliers, importId = null, initialAllocation = 'unmatched' }: Props) {
  const [allocation, setAllocation] = useState<Allocation>(initialAllocation);
  const [supplier, setSupplier] = useState<number | ''>('');
  const [q, setQ] = useState('');
  const search = useDebounced(q);
  const [sort, setSort] = useState<Sort>('date');
  const [dir, setDir] = useState<'asc' | 'desc'>('desc');
  const [page, setPage] = useState(1);
  const [data, setData] = useState<{ items: ImportLine[]; total: number; totalCents: number } | null>(null);
  const [tick, setTick] = useState(0);
  const [choice, setChoice] = useState<Record<number, { jobId: number | ''; category: CostCategory }>>({});
  const [splitting, setSplitting] = useState<{ id: number; by: 'amount' | 'percent'; parts: Part[] } | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    const ctrl = new AbortController();
    api<{ items: ImportLine[]; total: number; totalCents: number }>(`/api/receipts/lines?${params({ allocation, importId, supplier, q: search, sort, dir, page, pageSize: PAGE })}`, { signal: ctrl.signal })
      .then((r) => (r.ok ? setData(r.data) : setError(r.error.message)))
      .catch(() => {});
    return () => ctrl.abort();
  }, [allocation, importId, supplier, search, sort, dir, page, tick]);

  const onSort = (col: Sort) => { if (col === sort) setDir(dir === 'asc' ? 'desc' : 'asc'); else { setSort(col); setDir('desc'); } setPage(1); };
  const pickFor = (l: ImportLine) => choice[l.id] ?? { jobId: '' as const, category: (l.category ?? 'material') as CostCategory };

  async function send(l: ImportLine, path: string, body: unknown, done: (line: ImportLine) => string) {
    setError(null);
    const r = await api<ImportLine>(`/api/receipts/lines/${l.id}/${path}`, { body });
    if (!r.ok) { setError(r.error.message); return false; }
    setNotice(`Row ${l.rowNumber} of import #${l.importId} (${l.description ?? l.sku ?? 'line'}): ${done(r.data)}.`);
    setSplitting(null);
    setTick((t) => t + 1);
    return true;
  }

  const allocate = (l: ImportLine) => {
    const c = pickFor(l);
    if (!c.jobId) { setError('Choose the job first.'); return; }
    void send(l, 'allocation', { mode: 'job', jobId: c.jobId, category: c.category }, (line) => `allocated to ${describeParts(line)}`);
  };
  const overhead = (l: ImportLine) => void send(l, 'allocation', { mode: 'overhead', category: pickFor(l).category }, () => 'booked as overhead');

  function splitPreview(l: ImportLine): { parts: number[] | null; note: string } {
    if (!splitting) return { parts: null, note: '' };
    const total = l.totalCents ?? 0;
    if (splitting.by === 'percent') {
      const pcts = splitting.parts.map((p) => Number(p.value.replace(',', '.')));
      const sum = pcts.reduce((a, b) => a + (Number.isFinite(b) ? b : 0), 0);
      const r = splitByPercent(total, pcts);
      return { parts: r.ok ? r.parts : null, note: r.ok ? 'The parts add up to the line.' : `${Math.round((100 - sum) * 10000) / 10000} % left to place` };
    }
    const cents = splitting.parts.map((p) => { const m = parseMoney(p.value); return m.ok && m.value ? toCents(m.value) : NaN; });
    const sum = cents.reduce((a, b) => a + (Number.isFinite(b) ? b : 0), 0);
    const r = splitByAmount(total, cents.map((c) => (Number.isFinite(c) ? c : 0)));
    return { parts: r.ok ? r.parts : null, note: r.ok ? 'The parts add up to the line.' : `${formatMoney(total - sum)} left to place` };
  }

  function saveSplit(l: ImportLine) {
    if (!splitting) return;
    const parts = splitting.parts.map((p) => ({
      jobId: p.overhead ? null : p.jobId || null,
      category: p.category,
      ...(splitting.by === 'percent' ? { percent: Number(p.value.replace(',', '.')) } : { amountCents: p.value }),
    }));
    if (splitting.parts.some((p) => !p.overhead && !p.jobId)) { setError('Choose a job for each part, or mark it overhead.'); return; }
    void send(l, 'split', { by: splitting.by, parts }, (line) => `split into ${describeParts(line)}`);
  }

  const setPart = (i: number, p: Partial<Part>) => splitting && setSplitting({ ...splitting, parts: splitting.parts.map((x, j) => (j === i ? { ...x, ...p } : x)) });

  return (
    <div className="space-y-3" data-testid="allocation-table">
      <div className="flex flex-wrap items-end gap-3">
        <label>
          <span className="label">Show</span>
          <select className="input" value={allocation} onChange={(e) => { setAllocation(e.target.value as Allocation); setPage(1); }}>
            {ALLOCATIONS.map(([a, label]) => <option key={a} value={a}>{label}</option>)}
          </select>
        </label>
        <label>
          <span className="label">Supplier</span>
          <select className="input" value={supplier} onChange={(e) => { setSupplier(e.target.value ? Number(e.target.value) : ''); setPage(1); }}>
            <option value="">All suppliers</option>
            {suppliers.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </label>
        <label className="min-w-[14rem] flex-1">
          <span className="label">Search</span>
          <input className="input" type="search" value={q} placeholder="Description, SKU, memo, receipt number" onChange={(e) => { setQ(e.target.value); setPage(1); }} />
        </label>
      </div>
      {notice && <Notice>{notice}</Notice>}
      {error && <p role="alert" className="field-error">{error}</p>}
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead>
            <tr>
              <SortHeader label="Date" col="date" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Supplier" col="supplier" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Description" col="description" sort={sort} dir={dir} onSort={onSort} />
              <SortHeader label="Amount" col="amount" sort={sort} dir={dir} onSort={onSort} className="num" />
              <th>Why / where</th>
              <th>Allocate</th>
            </tr>
          </thead>
          <tbody>
            {data?.items.map((l) => {
              const c = pickFor(l);
              const preview = splitting?.id === l.id ? splitPreview(l) : null;
              return (
                <Fragment key={l.id}>
                  <tr data-testid={`line-${l.id}`}>
                    <td className="whitespace-nowrap">{l.date}</td>
                    <td>{l.supplierName ?? '—'}<span className="block text-xs text-galv-500">{[l.receiptNumber, l.lineNumber].filter(Boolean).join(' / ')} · <a href={`/receipts/${l.importId}#row-${l.rowNumber}`}>import #{l.importId} row {l.rowNumber}</a></span></td>
                    <td className="min-w-[12rem]">{l.description ?? l.sku ?? '—'}{l.quantity && <span className="block text-xs text-galv-500">{l.quantity} {l.unit ?? ''}{l.sku ? ` · ${l.sku}` : ''}</span>}{l.memo && <span className="block text-xs text-galv-500">Memo: {l.memo}</span>}</td>
                    <td className="num"><Money cents={l.totalCents} /></td>
                    <td className="text-xs">{l.allocation === 'unmatched' ? <span className="text-timber-800">{l.matchReason}</span> : describeParts(l)}</td>
                    <td>
                      <div className="flex min-w-[18rem] flex-wrap items-center gap-1">
                        <JobSelect jobs={jobs} value={c.jobId} onChange={(v) => setChoice({ ...choice, [l.id]: { ...c, jobId: v } })} label={`Job for row ${l.rowNumber}`} className="input w-40 py-1 text-xs" />
                        <CategorySelect value={c.category} onChange={(v) => setChoice({ ...choice, [l.id]: { ...c, category: v } })} label={`Category for row ${l.rowNumber}`} className="input w-32 py-1 text-xs" />
                        <button type="button" className="btn-primary px-2 py-1 text-xs" onClick={() => allocate(l)}>Allocate</button>
                        <button type="button" className="btn-secondary px-2 py-1 text-xs" onClick={() => setSplitting({ id: l.id, by: 'percent', parts: [{ jobId: '', overhead: false, category: c.category, value: '50' }, { jobId: '', overhead: false, category: c.category, value: '50' }] })}>Split…</button>
                        <button type="button" className="btn-secondary px-2 py-1 text-xs" onClick={() => overhead(l)}>Overhead</button>
                      </div>
                    </td>
                  </tr>
                  {splitting?.id === l.id && (
                    <tr className="bg-timber-50">
                      <td colSpan={6}>
                        <div className="space-y-2" aria-label="Split the line">
                          <div className="flex flex-wrap items-center gap-3 text-sm">
                            <span className="font-medium">Split {formatMoney(l.totalCents)}</span>
                            <label className="flex items-center gap-1"><input type="radio" checked={splitting.by === 'percent'} onChange={() => setSplitting({ ...splitting, by: 'percent' })} /> by percent</label>
                            <label className="flex items-center gap-1"><input type="radio" checked={splitting.by === 'amount'} onChange={() => setSplitting({ ...splitting, by: 'amount' })} /> by amount</label>
                          </div>
                          {splitting.parts.map((p, i) => (
                            <div key={i} className="flex flex-wrap items-center gap-2 text-sm">
                              <JobSelect jobs={jobs} value={p.overhead ? '' : p.jobId} onChange={(v) => setPart(i, { jobId: v, overhead: false })} label={`Part ${i + 1} job`} className="input w-48 py-1 text-xs" empty={p.overhead ? 'Overhead' : 'Choose a job'} />
                              <label className="flex items-center gap-1 text-xs"><input type="checkbox" checked={p.overhead} onChange={(e) => setPart(i, { overhead: e.target.checked, jobId: '' })} /> overhead</label>
                              <CategorySelect value={p.category} onChange={(v) => setPart(i, { category: v })} label={`Part ${i + 1} category`} className="input w-32 py-1 text-xs" />
                              <input className="input w-28 py-1 text-right text-xs" aria-label={`Part ${i + 1} ${splitting.by === 'percent' ? 'percent' : 'amount'}`} value={p.value} onChange={(e) => setPart(i, { value: e.target.value })} />
                              <span className="text-xs text-galv-500">{splitting.by === 'percent' ? '%' : ''}{preview?.parts ? ` = ${formatMoney(preview.parts[i])}` : ''}</span>
                              {splitting.parts.length > 2 && <button type="button" className="text-xs underline" onClick={() => setSplitting({ ...splitting, parts: splitting.parts.filter((_, j) => j !== i) })}>Remove</button>}
                            </div>
                          ))}
                          <p className={`text-xs ${preview?.parts ? 'text-moss-700' : 'text-timber-800'}`} role="status">{preview?.note}</p>
                          <div className="flex gap-2">
                            <button type="button" className="btn-secondary px-2 py-1 text-xs" onClick={() => setSplitting({ ...splitting, parts: [...splitting.parts, { jobId: '', overhead: false, category: c.category, value: '' }] })}>Add a part</button>
                            <button type="button" className="btn-primary px-2 py-1 text-xs" disabled={!preview?.parts} onClick={() => saveSplit(l)}>Save the split</button>
                            <button type="button" className="btn-secondary px-2 py-1 text-xs" onClick={() => setSplitting(null)}>Cancel</button>
                          </div>
                        </div>
                      </td>
                    </tr>
                  )}
                </Fragment>
              );
            })}
            {data && data.items.length === 0 && <tr><td colSpan={6} className="py-6 text-center text-galv-500">{allocation === 'unmatched' ? 'Nothing waiting: every receipt line is on a job or booked as overhead.' : 'No lines match.'}</td></tr>}
          </tbody>
          {data && data.total > 0 && (
            <tfoot><tr><td colSpan={3} className="text-right font-medium">{data.total} line{data.total === 1 ? '' : 's'}, all pages</td><td className="num font-semibold"><Money cents={data.totalCents} /></td><td colSpan={2} /></tr></tfoot>
          )}
        </table>
      </div>
      {data && <Pager page={page} pageSize={PAGE} total={data.total} noun={['line', 'lines']} onPage={setPage} />}
      <p className="text-xs text-galv-500">Categories: {Object.values(COST_CATEGORY_LABELS).join(', ')}. A split’s parts always add up to the line to the cent.</p>
    </div>
  );
}
