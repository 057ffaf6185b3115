import { useState } from 'react';
import { centsToInput, parseMoney } from '../../../lib/billing/money';
import { api } from '../ui/api';

/** Refunds part or all of one payment (a card payment through the card processor). */
export default function RefundButton({ invoiceId, paymentId, leftCents }: { invoiceId: number; paymentId: number; leftCents: number }) {
  const [open, setOpen] = useState(false);
  const [amount, setAmount] = useState(centsToInput(leftCents));
  const [reason, setReason] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  // One token per refund asked: pressing again after an error sends it again, and the server
  // asks the card processor for the same refund rather than a second one.
  const [requestKey] = useState(() => crypto.randomUUID().replace(/-/g, ''));
  if (!open) return <button type="button" className="text-xs underline" onClick={() => setOpen(true)}>Refund</button>;
  async function go() {
    const cents = parseMoney(amount);
    if (cents === null || cents <= 0) { setError('Enter an amount such as 50.00.'); return; }
    setBusy(true);
    const r = await api(`/api/invoices/${invoiceId}/payments/${paymentId}/refund`, { method: 'POST', body: { amountCents: cents, reason, requestKey } });
    if (r.ok) window.location.reload();
    else { setBusy(false); setError(r.error.message); }
  }
  return (
    <div className="mt-1 flex flex-wrap items-end gap-2">
      <label className="text-xs">Amount ($)<input className="input w-28" inputMode="decimal" value={amount} onChange={(e) => setAmount(e.target.value)} /></label>
      <label className="text-xs">Reason<input className="input w-48" value={reason} onChange={(e) => setReason(e.target.value)} /></label>
      <button type="button" className="btn-danger" disabled={busy} onClick={go}>{busy ? 'Refunding…' : 'Refund'}</button>
      {error && <p role="alert" className="field-error w-full">{error}</p>}
    </div>
  );
}
