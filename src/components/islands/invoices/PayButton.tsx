import { useState } from 'react';
import { api } from '../ui/api';

/** Starts a Checkout Session for the balance and sends the customer to the hosted pay page. */
export default function PayButton({ token, label }: { token: string; label: string }) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  async function pay() {
    setBusy(true);
    setError(null);
    const r = await api<{ url: string }>(`/api/public/invoices/${token}/checkout`, { method: 'POST', body: {} });
    if (r.ok) window.location.assign(r.data.url);
    else { setError(r.error.message); setBusy(false); }
  }
  return (
    <div>
      <button type="button" className="btn-primary w-full py-3 text-base sm:w-auto" onClick={pay} disabled={busy}>{busy ? 'Opening the secure pay page…' : label}</button>
      {error && <p role="alert" className="field-error">{error}</p>}
    </div>
  );
}
