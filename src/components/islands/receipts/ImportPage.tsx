import { useState } from 'react';
import type { CommitSummary, ImportDetail } from '../../../lib/csv/imports';
import type { ImportKind } from '../../../lib/csv/mapping';
import { api } from '../ui/api';
import { Notice } from '../costs/ui';
import ImportLines from './ImportLines';
import ImportReview from './ImportReview';

/** One import's page: a preview still to commit (or discard), or the committed rows. */
export default function ImportPage({ initial, kind, endpoint, listHref, mayWrite }: { initial: ImportDetail; kind: ImportKind; endpoint: string; listHref: string; mayWrite: boolean }) {
  const [d, setD] = useState(initial);
  const [busy, setBusy] = useState(false);
  const [summary, setSummary] = useState<CommitSummary | null>(null);
  const [error, setError] = useState<string | null>(null);

  async function refresh() {
    const r = await api<ImportDetail>(`${endpoint}/${d.id}`);
    if (r.ok) setD(r.data);
  }
  async function commit(allOrNothing: boolean) {
    setBusy(true); setError(null);
    const r = await api<{ summary: CommitSummary; import: ImportDetail }>(`${endpoint}/${d.id}/commit`, { body: { allOrNothing } });
    setBusy(false);
    if (!r.ok) { setError(r.error.message); return; }
    setSummary(r.data.summary);
    setD(r.data.import);
  }
  async function discard() {
    if (!window.confirm('Discard this upload? Nothing from it has been added.')) return;
    const r = await api(`${endpoint}/${d.id}`, { method: 'DELETE' });
    if (r.ok) window.location.href = listHref;
    else setError(r.error.message);
  }

  return (
    <div className="space-y-4">
      {error && <p role="alert" className="rounded-md border border-rust-600 bg-rust-100 px-3 py-2 text-sm text-rust-700">{error}</p>}
      {summary && <Notice tone={summary.added ? 'ok' : 'warn'}>{summary.message}</Notice>}
      {d.status === 'preview' && mayWrite ? (
        <>
          <ImportReview detail={d} kind={kind} endpoint={endpoint} busy={busy} onCommit={commit} onChanged={refresh} />
          <button type="button" className="btn-danger" onClick={discard}>Discard this upload</button>
        </>
      ) : (
        <ImportLines base={endpoint} importId={d.id} kind={kind} headers={d.headers} editable={false} />
      )}
    </div>
  );
}
