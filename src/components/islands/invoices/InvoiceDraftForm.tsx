import { useState, type SubmitEvent } from 'react';
import { invoiceDraftPatch } from '../../../lib/billing/schema';
import { INVOICE_KINDS, INVOICE_KIND_LABELS, LINE_CATEGORIES, LINE_CATEGORY_LABELS, type InvoiceKind, type LineCategory } from '../../../lib/billing/invoice';
import { TERMS, TERMS_LABELS, type Terms } from '../../../lib/billing/terms';
import { centsToInput, parseMoney } from '../../../lib/billing/money';
import { formatMoney, type CurrencyCode } from '../../../lib/format';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface LineRow { description: string; category: LineCategory; quantity: string; unitPrice: string }

export interface DraftFormProps {
  job: { id: number; code: string; title: string; customerName: string; commercial: boolean; contractCents: number; billedCents: number };
  changeOrders: { id: number; label: string; description: string; priceCents: number }[];
  settings: { defaultRetainagePct: number; terms: Terms; termsDays: number; depositCapCents: number | null };
  currency: CurrencyCode;
  initial?: {
    id: number; kind: InvoiceKind; basisPct: number | null; requestedCents: number | null; retainagePct: number; notes: string | null; terms: Terms; termsDays: number;
    changeOrderIds: number[]; lines: { description: string; category: LineCategory; quantity: number; unitPriceCents: number }[];
    overContractOk: boolean; overDepositCapOk: boolean; overrideReason: string | null;
  };
}

const KIND_HINTS: Record<InvoiceKind, string> = {
  deposit: 'Billed when the customer says yes, before materials are bought.',
  progress: 'Contract to date × percent complete, less what was billed before.',
  final: 'The rest of the contract, and the retainage held on progress bills.',
  extra: 'Lines of your own and approved change orders. They count against the contract: raise it with a change order first.',
};

/** Drafts an invoice for one job; the server builds the contract lines and checks the limits. */
export default function InvoiceDraftForm({ job, changeOrders, settings, currency, initial }: DraftFormProps) {
  const [kind, setKind] = useState<InvoiceKind>(initial?.kind ?? 'deposit');
  const [depositBy, setDepositBy] = useState<'pct' | 'amount'>(initial?.requestedCents ? 'amount' : 'pct');
  const [pct, setPct] = useState(initial?.basisPct != null ? String(initial.basisPct) : kind === 'deposit' ? '10' : '');
  const [amount, setAmount] = useState(initial?.requestedCents ? centsToInput(initial.requestedCents) : '');
  const [retainage, setRetainage] = useState(String(initial?.retainagePct ?? (job.commercial ? settings.defaultRetainagePct : 0)));
  const [cos, setCos] = useState<number[]>(initial?.changeOrderIds ?? []);
  const [lines, setLines] = useState<LineRow[]>(initial?.lines.map((l) => ({ description: l.description, category: l.category, quantity: String(l.quantity), unitPrice: centsToInput(l.unitPriceCents) })) ?? []);
  const [terms, setTerms] = useState<Terms>(initial?.terms ?? settings.terms);
  const [days, setDays] = useState(String(initial?.termsDays ?? settings.termsDays));
  const [notes, setNotes] = useState(initial?.notes ?? '');
  const [overContract, setOverContract] = useState(initial?.overContractOk ?? false);
  const [overCap, setOverCap] = useState(initial?.overDepositCapOk ?? false);
  const [reason, setReason] = useState(initial?.overrideReason ?? '');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const m = (c: number) => formatMoney(c, currency);

  const setLine = (i: number, patch: Partial<LineRow>) => setLines(lines.map((l, j) => (j === i ? { ...l, ...patch } : l)));

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const lineFields: Record<string, string> = {};
    const parsedLines = lines.map((l, i) => {
      const unit = parseMoney(l.unitPrice);
      if (unit === null) lineFields[`lines.${i}.unitPriceCents`] = 'Enter a price such as 120.00.';
      return { description: l.description, category: l.category, quantity: Number(l.quantity), unitPriceCents: unit ?? NaN, taxable: null };
    });
    const requested = kind === 'deposit' && depositBy === 'amount' ? parseMoney(amount) : null;
    if (kind === 'deposit' && depositBy === 'amount' && requested === null) lineFields.requestedCents = 'Enter an amount such as 1000.00.';
    const values = {
      kind,
      basisPct: (kind === 'deposit' && depositBy === 'pct') || kind === 'progress' ? (pct === '' ? null : Number(pct)) : null,
      requestedCents: requested,
      retainagePct: kind === 'progress' ? Number(retainage || 0) : null,
      lines: parsedLines,
      changeOrderIds: cos,
      terms,
      termsDays: terms === 'custom' ? (days === '' ? null : Number(days)) : null,
      notes,
      overContractOk: overContract,
      overDepositCapOk: overCap,
      overrideReason: reason,
    };
    const v = validate(invoiceDraftPatch, values);
    if (!v.ok || Object.keys(lineFields).length) { setFields({ ...(v.ok ? {} : v.fields), ...lineFields }); return; }
    setFields({});
    setBusy(true);
    const r = initial
      ? await api<{ id: number }>(`/api/invoices/${initial.id}`, { method: 'PATCH', body: v.data })
      : await api<{ id: number }>('/api/invoices', { method: 'POST', body: { jobId: job.id, ...v.data } });
    setBusy(false);
    if (r.ok) window.location.assign(`/invoices/${r.data.id}`);
    else { setError(r.error.message); setFields(r.error.fields ?? {}); }
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-6" data-testid="invoice-form">
      <FormError message={error} />
      <p className="text-sm text-galv-700">
        {job.code} · {job.title} · {job.customerName}. Contract with approved change orders {m(job.contractCents)}; billed so far {m(job.billedCents)}.
      </p>
      <fieldset>
        <legend className="label">Kind of invoice</legend>
        <div className="grid gap-2 sm:grid-cols-4">
          {INVOICE_KINDS.map((k) => (
            <label key={k} className={`cursor-pointer rounded-md border p-3 text-sm ${kind === k ? 'border-timber-600 bg-timber-50' : 'border-galv-200 bg-white'}`}>
              <input type="radio" name="kind" value={k} checked={kind === k} onChange={() => { setKind(k); if (k === 'progress' && !initial) setPct(''); }} className="mr-2" />
              <b>{INVOICE_KIND_LABELS[k]}</b>
              <span className="mt-1 block text-xs text-galv-600">{KIND_HINTS[k]}</span>
            </label>
          ))}
        </div>
        {fields.kind && <p className="field-error">{fields.kind}</p>}
      </fieldset>

      {kind === 'deposit' && (
        <div className="grid gap-4 sm:grid-cols-3">
          <Field id="depositBy" label="Ask for">
            {(p) => <select {...p} value={depositBy} onChange={(e) => setDepositBy(e.target.value as 'pct' | 'amount')}><option value="pct">A percent of the contract</option><option value="amount">An amount</option></select>}
          </Field>
          {depositBy === 'pct'
            ? <Field id="basisPct" label="Deposit (% of contract)" error={fields.basisPct}>{(p) => <input {...p} inputMode="decimal" value={pct} onChange={(e) => setPct(e.target.value)} />}</Field>
            : <Field id="requestedCents" label="Deposit amount ($)" error={fields.requestedCents}>{(p) => <input {...p} inputMode="decimal" value={amount} onChange={(e) => setAmount(e.target.value)} />}</Field>}
          <p className="self-end text-xs text-galv-600">{settings.depositCapCents !== null ? `Your deposit cap for this contract: ${m(settings.depositCapCents)}.` : 'No deposit cap is set (Company → Reminders and billing).'}</p>
        </div>
      )}
      {kind === 'progress' && (
        <div className="grid gap-4 sm:grid-cols-3">
          <Field id="basisPct" label="Percent complete" error={fields.basisPct} hint="Of the whole contract, change orders included.">{(p) => <input {...p} inputMode="decimal" value={pct} onChange={(e) => setPct(e.target.value)} />}</Field>
        </div>
      )}
      {kind === 'progress' && (
        <div className="grid gap-4 sm:grid-cols-3">
          <Field id="retainagePct" label="Retainage held (%)" error={fields.retainagePct} hint={job.commercial ? 'Held back from each progress bill and billed at the end.' : 'Usually 0 on residential work.'}>
            {(p) => <input {...p} inputMode="decimal" value={retainage} onChange={(e) => setRetainage(e.target.value)} />}
          </Field>
        </div>
      )}

      {changeOrders.length > 0 && (
        <fieldset>
          <legend className="label">Approved change orders not billed yet</legend>
          <ul className="space-y-1 text-sm">
            {changeOrders.map((c) => (
              <li key={c.id}><label><input type="checkbox" className="mr-2" checked={cos.includes(c.id)} onChange={() => setCos(cos.includes(c.id) ? cos.filter((x) => x !== c.id) : [...cos, c.id])} />{c.label}: {c.description} ({m(c.priceCents)})</label></li>
            ))}
          </ul>
          {fields.changeOrderIds && <p className="field-error">{fields.changeOrderIds}</p>}
        </fieldset>
      )}

      <fieldset className="space-y-2">
        <legend className="label">{kind === 'extra' ? 'Lines' : 'Extra lines (optional)'}</legend>
        {lines.map((l, i) => (
          <div key={i} className="grid gap-2 rounded-md border border-galv-200 p-2 sm:grid-cols-[1fr_9rem_6rem_8rem_auto]">
            <Field id={`lines.${i}.description`} label="Description" error={fields[`lines.${i}.description`]}>{(p) => <input {...p} value={l.description} onChange={(e) => setLine(i, { description: e.target.value })} />}</Field>
            <Field id={`lines.${i}.category`} label="Kind">{(p) => <select {...p} value={l.category} onChange={(e) => setLine(i, { category: e.target.value as LineCategory })}>{LINE_CATEGORIES.map((c) => <option key={c} value={c}>{LINE_CATEGORY_LABELS[c]}</option>)}</select>}</Field>
            <Field id={`lines.${i}.quantity`} label="Qty" error={fields[`lines.${i}.quantity`]}>{(p) => <input {...p} inputMode="decimal" value={l.quantity} onChange={(e) => setLine(i, { quantity: e.target.value })} />}</Field>
            <Field id={`lines.${i}.unitPriceCents`} label="Unit price ($)" error={fields[`lines.${i}.unitPriceCents`]}>{(p) => <input {...p} inputMode="decimal" value={l.unitPrice} onChange={(e) => setLine(i, { unitPrice: e.target.value })} />}</Field>
            <button type="button" className="btn-secondary self-end" onClick={() => setLines(lines.filter((_, j) => j !== i))} aria-label={`Remove line ${i + 1}`}>Remove</button>
          </div>
        ))}
        {fields.lines && <p className="field-error">{fields.lines}</p>}
        <button type="button" className="btn-secondary" onClick={() => setLines([...lines, { description: '', category: 'labour', quantity: '1', unitPrice: '' }])}>Add a line</button>
      </fieldset>

      <div className="grid gap-4 sm:grid-cols-3">
        <Field id="terms" label="Payment terms" error={fields.terms}>{(p) => <select {...p} value={terms} onChange={(e) => setTerms(e.target.value as Terms)}>{TERMS.map((t) => <option key={t} value={t}>{TERMS_LABELS[t]}</option>)}</select>}</Field>
        {terms === 'custom' && <Field id="termsDays" label="Days to pay" error={fields.termsDays}>{(p) => <input {...p} inputMode="numeric" value={days} onChange={(e) => setDays(e.target.value)} />}</Field>}
      </div>
      <Field id="notes" label="Notes on the invoice" error={fields.notes}>{(p) => <textarea {...p} rows={3} value={notes} onChange={(e) => setNotes(e.target.value)} />}</Field>

      <details className="rounded-md border border-galv-200 p-3" open={overContract || overCap}>
        <summary className="cursor-pointer text-sm font-medium">Limits and overrides</summary>
        <p className="mt-2 text-xs text-galv-600">Tallypost refuses to issue a bill that takes the job past its contract plus approved change orders, or a deposit over your cap, unless you say why here.</p>
        <label className="mt-2 block text-sm"><input type="checkbox" className="mr-2" checked={overContract} onChange={(e) => setOverContract(e.target.checked)} />Allow billing past the contract</label>
        <label className="block text-sm"><input type="checkbox" className="mr-2" checked={overCap} onChange={(e) => setOverCap(e.target.checked)} />Allow a deposit over the cap</label>
        <div className="mt-2"><Field id="overrideReason" label="Why" error={fields.overrideReason}>{(p) => <input {...p} value={reason} onChange={(e) => setReason(e.target.value)} />}</Field></div>
      </details>
      <button className="btn-primary" type="submit" disabled={busy}>{busy ? 'Saving…' : initial ? 'Save the draft' : 'Save as draft'}</button>
    </form>
  );
}
