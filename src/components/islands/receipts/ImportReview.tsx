import { useState } from 'react';
import type { ImportDetail } from '../../../lib/csv/imports';
import type { ImportKind } from '../../../lib/csv/mapping';
import { formatMoney } from '../../../lib/format';
import { Notice } from '../costs/ui';
import ImportLines from './ImportLines';

interface Props {
  detail: ImportDetail;
  kind: ImportKind;
  endpoint: string;
  busy: boolean;
  onCommit: (allOrNothing: boolean) => void;
  onChanged: () => void;
}

/** What the server made of an uploaded file: counts, the rows that need a look, and the commit. */
export default function ImportReview({ detail: d, kind, endpoint, busy, onCommit, onChanged }: Props) {
  const [allOrNothing, setAllOrNothing] = useState(false);
  const c = d.counts;
  const blocked = Object.keys(d.mappingProblems).length > 0;
  const noun = kind === 'receipts' ? 'receipt lines' : 'timesheet rows';
  return (
    <div className="space-y-3" data-testid="import-preview">
      <dl className="grid grid-cols-2 gap-2 text-sm sm:grid-cols-3 lg:grid-cols-6">
        <div className="rounded-md bg-moss-100 p-2"><dt className="text-xs text-moss-700">Ready to add</dt><dd className="text-lg font-semibold" data-testid="preview-ready">{c.lines - c.committed}</dd></div>
        {kind === 'receipts' && <div className="rounded-md bg-galv-50 p-2"><dt className="text-xs text-galv-600">Total of those</dt><dd className="text-lg font-semibold">{formatMoney(c.goodCents - c.committedCents)}</dd></div>}
        <div className="rounded-md bg-galv-50 p-2"><dt className="text-xs text-galv-600">Matched to a job / not</dt><dd className="text-lg font-semibold">{c.matched} / {c.unmatched}</dd></div>
        <div className={`rounded-md p-2 ${c.errors ? 'bg-rust-100' : 'bg-galv-50'}`}><dt className="text-xs text-galv-700">Rows with errors</dt><dd className="text-lg font-semibold" data-testid="preview-errors">{c.errors}</dd></div>
        <div className="rounded-md bg-galv-50 p-2"><dt className="text-xs text-galv-600">Skipped: totals, blank rows</dt><dd className="text-lg font-semibold">{c.skipped} + {c.blank}</dd></div>
        <div className="rounded-md bg-galv-50 p-2"><dt className="text-xs text-galv-600">Already imported</dt><dd className="text-lg font-semibold">{c.duplicates}</dd></div>
      </dl>
      {d.duplicateOf && <Notice tone="warn">This exact file was imported before as import #{d.duplicateOf.id}. Its lines already imported are left out; only rows fixed here that were not imported then are added.</Notice>}
      {blocked && <p role="alert" className="field-error">{Object.values(d.mappingProblems).join(' ')}</p>}
      {(c.errors > 0 || c.skipped > 0 || c.duplicates > 0) && (
        <details open={c.errors > 0}>
          <summary className="cursor-pointer text-sm font-medium">Rows that need a look</summary>
          <div className="mt-2">
            <ImportLines base={endpoint} importId={d.id} kind={kind} headers={d.headers} editable initialFilter="problems" onChanged={onChanged} />
          </div>
        </details>
      )}
      <div className="flex flex-wrap items-center gap-3">
        <button type="button" className="btn-primary" disabled={blocked || busy} onClick={() => onCommit(allOrNothing)}>
          {busy ? 'Committing…' : `Commit ${c.lines} ${noun}`}
        </button>
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={allOrNothing} onChange={(e) => setAllOrNothing(e.target.checked)} />
          All or nothing: refuse if any row has an error
        </label>
      </div>
    </div>
  );
}
