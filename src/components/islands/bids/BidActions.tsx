import { useState } from 'react';
import { api } from '../ui/api';

interface Props { jobId: number; bidId: number; versionNo: number; status: string; unpriced: number }

/** Send, accept, decline or delete one bid version. */
export default function BidActions({ jobId, bidId, versionNo, status, unpriced }: Props) {
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const run = async (method: 'POST' | 'PATCH' | 'DELETE', path: string, body?: unknown, then = () => window.location.reload()) => {
    setBusy(true);
    const r = await api(path, { method, body: body ?? {} });
    setBusy(false);
    if (r.ok) then(); else setError(r.error.message);
  };
  const base = `/api/jobs/${jobId}/bids/${bidId}`;
  return (
    <div className="flex flex-wrap items-center gap-2">
      {status === 'draft' && <button className="btn-secondary" disabled={busy} onClick={() => run('PATCH', base, { status: 'sent' })}>Mark sent</button>}
      {(status === 'draft' || status === 'sent' || status === 'declined') && (
        <button className="btn-primary" disabled={busy || unpriced > 0} title={unpriced ? 'Price every line first' : undefined} onClick={() => run('POST', `${base}/accept`)}>Accept version {versionNo}</button>
      )}
      {status === 'sent' && <button className="btn-secondary" disabled={busy} onClick={() => run('PATCH', base, { status: 'declined' })}>Customer declined</button>}
      {status === 'draft' && <button className="btn-danger" disabled={busy} onClick={() => { if (window.confirm(`Delete draft version ${versionNo}?`)) run('DELETE', base, undefined, () => window.location.assign(`/jobs/${jobId}`)); }}>Delete draft</button>}
      {error && <p role="alert" className="field-error w-full">{error}</p>}
    </div>
  );
}
