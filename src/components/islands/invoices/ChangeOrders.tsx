import { useState, type SubmitEvent } from 'react';
import { changeOrderDecision, changeOrderInput } from '../../../lib/billing/schema';
import { parseMoney } from '../../../lib/billing/money';
import { COST_CATEGORY_LABELS, type CostCategory } from '../../../lib/costs/categories';
import { formatDate, formatMoney, type CurrencyCode } from '../../../lib/format';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface CO { id: number; label: string; description: string; priceCents: number; status: 'proposed' | 'approved' | 'declined'; approvedOn: string | null; approvedByName: string | null; billedOnInvoiceId: number | null; costs: Partial<Record<CostCategory, number>> }

const COST_FIELDS: CostCategory[] = ['material', 'labour', 'rental', 'other'];

/** A job's change orders: propose one with its price and estimated cost, record the customer's answer. */
export default function ChangeOrders({ jobId, initial, today, currency, mayWrite }: { jobId: number; initial: CO[]; today: string; currency: CurrencyCode; mayWrite: boolean }) {
  const [adding, setAdding] = useState(false);
  const [form, setForm] = useState<Record<string, string>>({ description: '', price: '', material: '', labour: '', rental: '', other: '' });
  const [deciding, setDeciding] = useState<number | null>(null);
  const [decision, setDecision] = useState({ decidedOn: today, approvedByName: '' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const m = (c: number) => formatMoney(c, currency);

  async function add(e: SubmitEvent) {
    e.preventDefault();
    const bad: Record<string, string> = {};
    const money = (k: string) => { const v = form[k].trim(); if (!v) return 0; const c = parseMoney(v); if (c === null) bad[k === 'price' ? 'priceCents' : `costs.${k}`] = 'Enter an amount such as 450.00.'; return c ?? 0; };
    const costs = Object.fromEntries(COST_FIELDS.map((k) => [k, money(k)]).filter(([, c]) => (c as number) > 0));
    const v = validate(changeOrderInput, { jobId, description: form.description, priceCents: money('price'), costs });
    if (!v.ok || Object.keys(bad).length) { setFields({ ...(v.ok ? {} : v.fields), ...bad }); return; }
    const r = await api('/api/change-orders', { method: 'POST', body: v.data });
    if (r.ok) window.location.reload(); else { setError(r.error.message); setFields(r.error.fields ?? {}); }
  }

  async function decide(id: number, d: 'approved' | 'declined') {
    const v = validate(changeOrderDecision, { decision: d, decidedOn: decision.decidedOn, approvedByName: decision.approvedByName });
    if (!v.ok) { setFields(v.fields); return; }
    const r = await api(`/api/change-orders/${id}/decision`, { method: 'POST', body: v.data });
    if (r.ok) window.location.reload(); else setError(r.error.message);
  }

  return (
    <div className="space-y-3" data-testid="change-orders">
      <FormError message={error} />
      {initial.length === 0 ? <p className="text-sm text-galv-500">No change orders.</p> : (
        <ul className="divide-y divide-galv-100 text-sm">
          {initial.map((c) => (
            <li key={c.id} className="py-2">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <span><b>{c.label}</b> {c.description}</span>
                <span className="font-medium">{m(c.priceCents)}</span>
              </div>
              <p className="text-xs text-galv-600">
                {c.status === 'approved' ? `Approved ${formatDate(c.approvedOn)} by ${c.approvedByName}` : c.status === 'declined' ? 'Declined' : 'Waiting for the customer'}
                {c.billedOnInvoiceId ? <> · <a className="underline" href={`/invoices/${c.billedOnInvoiceId}`}>billed</a></> : c.status === 'approved' ? ' · not billed yet' : ''}
                {Object.keys(c.costs).length > 0 && ` · est. cost ${Object.entries(c.costs).map(([k, v]) => `${COST_CATEGORY_LABELS[k as CostCategory]} ${m(v ?? 0)}`).join(', ')}`}
              </p>
              {mayWrite && c.status === 'proposed' && (deciding === c.id ? (
                <div className="mt-2 flex flex-wrap items-end gap-2">
                  <Field id={`decidedOn-${c.id}`} label="Approved on" error={fields.decidedOn}>{(p) => <input {...p} type="date" value={decision.decidedOn} onChange={(e) => setDecision({ ...decision, decidedOn: e.target.value })} />}</Field>
                  <Field id={`approvedByName-${c.id}`} label="Approved by" error={fields.approvedByName}>{(p) => <input {...p} value={decision.approvedByName} onChange={(e) => setDecision({ ...decision, approvedByName: e.target.value })} />}</Field>
                  <button type="button" className="btn-primary" onClick={() => decide(c.id, 'approved')}>Record approval</button>
                  <button type="button" className="btn-secondary" onClick={() => decide(c.id, 'declined')}>Declined</button>
                </div>
              ) : <button type="button" className="mt-1 text-xs underline" onClick={() => { setDeciding(c.id); setFields({}); }}>Record the customer's answer</button>)}
            </li>
          ))}
        </ul>
      )}
      {mayWrite && (adding ? (
        <form onSubmit={add} noValidate className="space-y-3 rounded-md border border-galv-200 p-3" aria-label="New change order">
          <Field id="description" label="What changes" error={fields.description}>{(p) => <input {...p} value={form.description} onChange={(e) => setForm({ ...form, description: e.target.value })} />}</Field>
          <div className="grid gap-3 sm:grid-cols-5">
            <Field id="priceCents" label="Price to the customer ($)" error={fields.priceCents}>{(p) => <input {...p} inputMode="decimal" value={form.price} onChange={(e) => setForm({ ...form, price: e.target.value })} />}</Field>
            {COST_FIELDS.map((k) => <Field key={k} id={`costs.${k}`} label={`Est. ${COST_CATEGORY_LABELS[k].toLowerCase()} ($)`} error={fields[`costs.${k}`]}>{(p) => <input {...p} inputMode="decimal" value={form[k]} onChange={(e) => setForm({ ...form, [k]: e.target.value })} />}</Field>)}
          </div>
          <button className="btn-primary" type="submit">Save the change order</button>
        </form>
      ) : <button type="button" className="btn-secondary" onClick={() => setAdding(true)}>New change order</button>)}
    </div>
  );
}
