import { useState, type SubmitEvent } from 'react';
import { paymentInput, voidInput } from '../../../lib/billing/schema';
import { MANUAL_METHODS, PAYMENT_METHOD_LABELS } from '../../../lib/billing/payments';
import { centsToInput, parseMoney } from '../../../lib/billing/money';
import type { InvoiceStatus } from '../../../lib/billing/invoice';
import { formatMoney, type CurrencyCode } from '../../../lib/format';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface Props {
  id: number;
  status: InvoiceStatus;
  balanceCents: number;
  today: string;
  currency: CurrencyCode;
  hasEmail: boolean;
  sendCount: number;
  may: { draft: boolean; send: boolean; pay: boolean };
}

type Panel = null | 'pay' | 'void';

/** What can be done to an invoice from its page; each action reloads the page with the new state. */
export default function InvoiceActions({ id, status, balanceCents, today, currency, hasEmail, sendCount, may }: Props) {
  const [panel, setPanel] = useState<Panel>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [pay, setPay] = useState({ amount: centsToInput(balanceCents), method: 'check', receivedOn: today, reference: '', asCredit: false });
  const [voidForm, setVoidForm] = useState({ reason: '', replace: true });
  const open = status === 'issued' || status === 'partly_paid';

  async function act(label: string, path: string, body: unknown = {}, method = 'POST') {
    setBusy(label);
    setError(null);
    const r = await api<{ replacementId?: number | null }>(path, { method, body });
    if (r.ok) {
      if (label === 'discard') window.location.assign('/invoices');
      else if (r.data?.replacementId) window.location.assign(`/invoices/${r.data.replacementId}`);
      else window.location.reload();
      return;
    }
    setBusy(null);
    setError(r.error.message);
    setFields(r.error.fields ?? {});
  }

  function submitPayment(e: SubmitEvent) {
    e.preventDefault();
    const cents = parseMoney(pay.amount);
    const v = validate(paymentInput, { amountCents: cents ?? NaN, method: pay.method, receivedOn: pay.receivedOn, reference: pay.reference, asCredit: pay.asCredit });
    if (!v.ok || cents === null) { setFields({ ...(v.ok ? {} : v.fields), ...(cents === null ? { amountCents: 'Enter an amount such as 250.00.' } : {}) }); return; }
    void act('pay', `/api/invoices/${id}/payments`, v.data);
  }

  function submitVoid(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(voidInput, voidForm);
    if (!v.ok) { setFields(v.fields); return; }
    void act('void', `/api/invoices/${id}/void`, v.data);
  }

  return (
    <div className="space-y-3" data-testid="invoice-actions">
      <FormError message={error} />
      <div className="flex flex-wrap gap-2">
        {status === 'draft' && may.draft && <a className="btn-secondary" href={`/invoices/${id}/edit`}>Edit the draft</a>}
        {status === 'draft' && may.send && <button type="button" className="btn-secondary" disabled={!!busy} onClick={() => act('issue', `/api/invoices/${id}/issue`)}>{busy === 'issue' ? 'Issuing…' : 'Issue (give it a number)'}</button>}
        {status === 'draft' && may.send && hasEmail && <button type="button" className="btn-primary" disabled={!!busy} onClick={() => act('send', `/api/invoices/${id}/send`)}>{busy === 'send' ? 'Sending…' : 'Issue and send'}</button>}
        {open && may.send && hasEmail && <button type="button" className="btn-primary" disabled={!!busy} onClick={() => act('send', `/api/invoices/${id}/send`)}>{busy === 'send' ? 'Sending…' : sendCount ? 'Send again' : 'Send to the customer'}</button>}
        {open && may.pay && <button type="button" className="btn-secondary" onClick={() => setPanel(panel === 'pay' ? null : 'pay')} aria-expanded={panel === 'pay'}>Record a payment</button>}
        {open && may.send && <button type="button" className="btn-danger" onClick={() => setPanel(panel === 'void' ? null : 'void')} aria-expanded={panel === 'void'}>Void</button>}
        {status === 'draft' && may.draft && <button type="button" className="btn-danger" disabled={!!busy} onClick={() => { if (window.confirm('Discard this draft?')) void act('discard', `/api/invoices/${id}`, {}, 'DELETE'); }}>Discard the draft</button>}
        {status !== 'draft' && may.send && <button type="button" className="btn-secondary" disabled={!!busy} onClick={() => { if (window.confirm('Revoke the customer\'s link? The link already sent stops working; the next send carries a new one.')) void act('revoke', `/api/invoices/${id}/link`, {}, 'DELETE'); }}>{busy === 'revoke' ? 'Revoking…' : 'Revoke the customer\'s link'}</button>}
      </div>
      {panel === 'pay' && (
        <form onSubmit={submitPayment} noValidate className="card grid gap-3 sm:grid-cols-3" aria-label="Record a payment">
          <Field id="amountCents" label="Amount ($)" error={fields.amountCents} hint={`Balance ${formatMoney(balanceCents, currency)}`}>{(p) => <input {...p} inputMode="decimal" value={pay.amount} onChange={(e) => setPay({ ...pay, amount: e.target.value })} />}</Field>
          <Field id="method" label="Paid by" error={fields.method}>{(p) => <select {...p} value={pay.method} onChange={(e) => setPay({ ...pay, method: e.target.value })}>{MANUAL_METHODS.map((mm) => <option key={mm} value={mm}>{PAYMENT_METHOD_LABELS[mm]}</option>)}</select>}</Field>
          <Field id="receivedOn" label="Received on" error={fields.receivedOn}>{(p) => <input {...p} type="date" max={today} value={pay.receivedOn} onChange={(e) => setPay({ ...pay, receivedOn: e.target.value })} />}</Field>
          <Field id="reference" label="Check number or reference" error={fields.reference}>{(p) => <input {...p} value={pay.reference} onChange={(e) => setPay({ ...pay, reference: e.target.value })} />}</Field>
          <label className="self-end text-sm"><input type="checkbox" className="mr-2" checked={pay.asCredit} onChange={(e) => setPay({ ...pay, asCredit: e.target.checked })} />Keep any overpayment as credit</label>
          <div className="self-end"><button className="btn-primary" type="submit" disabled={!!busy}>{busy === 'pay' ? 'Recording…' : 'Record the payment'}</button></div>
        </form>
      )}
      {panel === 'void' && (
        <form onSubmit={submitVoid} noValidate className="card space-y-3" aria-label="Void the invoice">
          <p className="text-sm">A void invoice keeps its number and stays on file; it no longer counts as billed.</p>
          <Field id="reason" label="Reason" error={fields.reason}>{(p) => <input {...p} value={voidForm.reason} onChange={(e) => setVoidForm({ ...voidForm, reason: e.target.value })} />}</Field>
          <label className="block text-sm"><input type="checkbox" className="mr-2" checked={voidForm.replace} onChange={(e) => setVoidForm({ ...voidForm, replace: e.target.checked })} />Start a replacement draft with the same lines</label>
          <button className="btn-danger" type="submit" disabled={!!busy}>{busy === 'void' ? 'Voiding…' : 'Void the invoice'}</button>
        </form>
      )}
    </div>
  );
}
