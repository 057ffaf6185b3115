import { Fragment, useEffect, useState } from 'react';
import type { ImportLine, LineState } from '../../../lib/csv/imports';
import { TIME_TASK_LABELS, type TimeTask } from '../../../lib/labour/tasks';
import { api } from '../ui/api';
import { Money, Pager, params } from '../costs/ui';

type Filter = 'all' | 'problems' | 'ok' | 'error' | 'skipped' | 'duplicate' | 'committed';

interface Props {
  /** /api/receipts/imports or /api/time/imports */
  base: string;
  importId: number;
  kind: 'receipts' | 'timesheet';
  headers: string[];
  /** a preview: flagged rows can be corrected */
  editable: boolean;
  initialFilter?: Filter;
  onChanged?: () => void;
}

const STATE_LABEL: Record<LineState, string> = { ok: 'Ready', error: 'Error', skipped: 'Skipped', committed: 'Added', duplicate: 'Already imported' };
const STATE_TONE: Record<LineState, string> = { ok: 'bg-moss-100 text-moss-700', committed: 'bg-moss-100 text-moss-700', error: 'bg-rust-100 text-rust-700', skipped: 'bg-galv-100 text-galv-700', duplicate: 'bg-timber-100 text-timber-800' };
const FILTERS: [Filter, string][] = [['all', 'All rows'], ['problems', 'Needs a look'], ['error', 'Errors'], ['skipped', 'Skipped'], ['duplicate', 'Already imported']];
const PAGE = 100;

/** The job a line matched, or where the bookkeeper put it since. */
function jobCell(l: ImportLine) {
  if (l.parts?.length && l.allocation !== 'unmatched') return <span className="font-medium">{[...new Set(l.parts.map((p) => p.jobCode ?? 'Overhead'))].join(' + ')}</span>;
  if (l.matchedJobCode) return <span className="font-medium">{l.matchedJobCode}</span>;
  return l.state === 'ok' || l.state === 'committed' ? <span className="text-timber-800">Unmatched</span> : '—';
}

/** The rows of one import with their state and reason; in a preview, flagged rows can be fixed. */
export default function ImportLines({ base, importId, kind, headers, editable, initialFilter = 'all', onChanged }: Props) {
  const [filter, setFilter] = useState<Filter>(initialFilter);
  const [page, setPage] = useState(1);
  const [data, setData] = useState<{ items: ImportLine[]; total: number } | null>(null);
  const [editing, setEditing] = useState<{ id: number; cells: string[] } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [tick, setTick] = useState(0);

  useEffect(() => {
    const ctrl = new AbortController();
    api<{ items: ImportLine[]; total: number }>(`${base}/${importId}/lines?${params({ state: filter, page, pageSize: PAGE })}`, { signal: ctrl.signal })
      .then((r) => (r.ok ? setData(r.data) : setError(r.error.message)))
      .catch(() => {});
    return () => ctrl.abort();
  }, [base, importId, filter, page, tick]);

  async function save() {
    if (!editing) return;
    setError(null);
    const r = await api<ImportLine>(`${base}/${importId}/lines/${editing.id}`, { method: 'PATCH', body: { cells: editing.cells } });
    if (!r.ok) { setError(r.error.message); return; }
    setEditing(null);
    setTick((t) => t + 1);
    onChanged?.();
  }

  const cols = kind === 'receipts' ? 9 : 7;
  return (
    <div className="space-y-2" data-testid="import-lines">
      <div className="flex flex-wrap gap-2" role="group" aria-label="Which rows">
        {FILTERS.map(([f, label]) => (
          <button key={f} type="button" aria-pressed={filter === f} onClick={() => { setFilter(f); setPage(1); }}
            className={`rounded-full border px-3 py-1 text-xs ${filter === f ? 'border-timber-600 bg-timber-100 font-semibold text-timber-800' : 'border-galv-300 bg-white text-galv-700'}`}>{label}</button>
        ))}
      </div>
      {error && <p role="alert" className="field-error">{error}</p>}
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead>
            <tr>
              <th className="num">Row</th><th>State</th><th>Date</th>
              {kind === 'receipts' ? <><th>Receipt</th><th>Item</th><th>Description</th><th className="num">Qty</th><th className="num">Amount</th></> : <><th>Worker</th><th className="num">Hours</th><th>Task</th></>}
              <th>Job</th>
            </tr>
          </thead>
          <tbody>
            {data?.items.map((l) => (
              <Fragment key={l.id}>
                <tr id={`row-${l.rowNumber}`}>
                  <td className="num text-galv-500">{l.rowNumber}</td>
                  <td><span className={`pill ${STATE_TONE[l.state]}`}>{STATE_LABEL[l.state]}</span>{l.fixed && <span className="ml-1 text-xs text-galv-500">fixed</span>}</td>
                  <td className="whitespace-nowrap">{l.date ?? '—'}</td>
                  {kind === 'receipts' ? (
                    <>
                      <td className="whitespace-nowrap">{[l.receiptNumber, l.lineNumber].filter(Boolean).join(' / ') || '—'}</td>
                      <td>{l.sku ?? '—'}</td>
                      <td className="min-w-[12rem]">{l.description ?? '—'}</td>
                      <td className="num whitespace-nowrap">{l.quantity ? `${l.quantity} ${l.unit ?? ''}` : '—'}</td>
                      <td className="num">{l.totalCents === null ? '—' : <Money cents={l.totalCents} />}</td>
                    </>
                  ) : (
                    <>
                      <td>{l.workerName ?? '—'}</td>
                      <td className="num">{l.hours ?? '—'}</td>
                      <td>{l.task ? TIME_TASK_LABELS[l.task as TimeTask] : '—'}</td>
                    </>
                  )}
                  <td className="whitespace-nowrap">{jobCell(l)}</td>
                </tr>
                {(l.reason || (l.state !== 'ok' && l.state !== 'committed')) && (
                  <tr className="bg-galv-50">
                    <td />
                    <td colSpan={cols} className="text-xs">
                      {l.reason && <p className={l.state === 'error' ? 'text-rust-700' : 'text-galv-700'}>Row {l.rowNumber}: {l.reason}</p>}
                      <p className="mt-1 font-mono text-[11px] text-galv-500" title="The row as the file has it">{l.raw.map((c) => JSON.stringify(c)).join(', ')}</p>
                      {editable && l.state === 'error' && editing?.id !== l.id && (
                        <button type="button" className="btn-secondary mt-1 px-2 py-1 text-xs" onClick={() => setEditing({ id: l.id, cells: headers.map((_, i) => (l.fixed ?? l.raw)[i] ?? '') })}>Fix row {l.rowNumber}</button>
                      )}
                      {editing?.id === l.id && (
                        <div className="mt-2 space-y-2">
                          <div className="grid gap-2 sm:grid-cols-3 lg:grid-cols-4">
                            {headers.map((h, i) => (
                              <label key={h + i} className="text-xs">
                                <span className="label text-xs">{h}</span>
                                <input className="input py-1" value={editing.cells[i] ?? ''} onChange={(e) => setEditing({ ...editing, cells: editing.cells.map((c, j) => (j === i ? e.target.value : c)) })} />
                              </label>
                            ))}
                          </div>
                          <div className="flex gap-2">
                            <button type="button" className="btn-primary px-2 py-1 text-xs" onClick={save}>Check the row again</button>
                            <button type="button" className="btn-secondary px-2 py-1 text-xs" onClick={() => setEditing(null)}>Cancel</button>
                          </div>
                        </div>
                      )}
                    </td>
                  </tr>
                )}
              </Fragment>
            ))}
            {data && data.items.length === 0 && <tr><td colSpan={cols + 1} className="py-6 text-center text-galv-500">No rows here.</td></tr>}
          </tbody>
        </table>
      </div>
      {data && <Pager page={page} pageSize={PAGE} total={data.total} noun={['row', 'rows']} onPage={setPage} />}
    </div>
  );
}
