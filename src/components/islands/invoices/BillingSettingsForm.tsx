import { useState, type SubmitEvent } from 'react';
import { billingSettingsInput } from '../../../lib/billing/schema';
import { centsToInput, parseMoney } from '../../../lib/billing/money';
import { describeOffset, parseSchedule } from '../../../lib/reminders';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface Initial { depositCapPct: number | null; depositCapCents: number | null; defaultRetainagePct: number; paymentTermsDays: number; invoicePrefix: string; remindersEnabled: boolean; reminderOffsets: string }

/** The reminder schedule and the billing rules: deposit cap, retainage, terms, numbering. */
export default function BillingSettingsForm({ initial }: { initial: Initial }) {
  const [v, setV] = useState({
    capPct: initial.depositCapPct === null ? '' : String(initial.depositCapPct),
    capAmount: initial.depositCapCents === null ? '' : centsToInput(initial.depositCapCents),
    retainage: String(initial.defaultRetainagePct),
    terms: String(initial.paymentTermsDays),
    prefix: initial.invoicePrefix,
    enabled: initial.remindersEnabled,
    offsets: initial.reminderOffsets,
  });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const set = (k: keyof typeof v) => (e: { target: { value: string } }) => { setSaved(false); setV({ ...v, [k]: e.target.value }); };
  const schedule = parseSchedule(v.offsets);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const capCents = v.capAmount.trim() === '' ? null : parseMoney(v.capAmount);
    const values = {
      depositCapPct: v.capPct.trim() === '' ? null : Number(v.capPct), depositCapCents: capCents, defaultRetainagePct: Number(v.retainage),
      paymentTermsDays: Number(v.terms), invoicePrefix: v.prefix.trim().toUpperCase(), remindersEnabled: v.enabled, reminderOffsets: v.offsets,
    };
    const r0 = validate(billingSettingsInput, values);
    if (!r0.ok || (v.capAmount.trim() !== '' && capCents === null)) { setFields({ ...(r0.ok ? {} : r0.fields), ...(capCents === null && v.capAmount.trim() !== '' ? { depositCapCents: 'Enter an amount such as 1000.00.' } : {}) }); return; }
    setFields({});
    const r = await api('/api/reminders/settings', { method: 'PUT', body: r0.data });
    if (r.ok) { setSaved(true); setError(null); } else { setError(r.error.message); setFields(r.error.fields ?? {}); }
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-6" data-testid="billing-settings">
      <FormError message={error} />
      {saved && <p role="status" className="rounded-md bg-moss-100 px-3 py-2 text-sm text-moss-700">Saved.</p>}
      <section className="space-y-3">
        <h2>Payment reminders</h2>
        <label className="block text-sm"><input type="checkbox" className="mr-2" checked={v.enabled} onChange={(e) => { setSaved(false); setV({ ...v, enabled: e.target.checked }); }} />Send reminders for unpaid invoices</label>
        <Field id="reminderOffsets" label="Days from the due date" error={fields.reminderOffsets} hint="Negative is before the due date: -3, 0, 7, 14 sends 3 days before, on the day, and 7 and 14 days after.">
          {(p) => <input {...p} value={v.offsets} onChange={set('offsets')} />}
        </Field>
        {schedule && <ul className="list-disc pl-6 text-sm text-galv-700" aria-label="The schedule in words">{schedule.map((o) => <li key={o}>{describeOffset(o)}</li>)}</ul>}
        <p className="text-xs text-galv-600">Each reminder goes once; a paid or void invoice gets no more.</p>
      </section>
      <section className="space-y-3">
        <h2>Deposits</h2>
        <p className="text-sm text-galv-700">Some places cap what a home-improvement contractor may take up front. California's Business and Professions Code §7159.5(a)(3) allows $1,000 or 10 % of the contract, whichever is less. A deposit over your cap is flagged and needs a written reason to issue.</p>
        <div className="grid gap-4 sm:grid-cols-3">
          <Field id="depositCapPct" label="Cap: percent of contract" error={fields.depositCapPct} hint="Empty for none.">{(p) => <input {...p} inputMode="decimal" value={v.capPct} onChange={set('capPct')} />}</Field>
          <Field id="depositCapCents" label="Cap: amount ($)" error={fields.depositCapCents} hint="Empty for none. With both, the lesser applies.">{(p) => <input {...p} inputMode="decimal" value={v.capAmount} onChange={set('capAmount')} />}</Field>
          <div className="self-end"><button type="button" className="btn-secondary" onClick={() => { setSaved(false); setV({ ...v, capPct: '10', capAmount: '1000.00' }); }}>Use $1,000 or 10 %</button></div>
        </div>
      </section>
      <section className="grid gap-4 sm:grid-cols-3">
        <Field id="defaultRetainagePct" label="Retainage on commercial jobs (%)" error={fields.defaultRetainagePct} hint="Held back from each progress bill; 5–10 % is common.">{(p) => <input {...p} inputMode="decimal" value={v.retainage} onChange={set('retainage')} />}</Field>
        <Field id="paymentTermsDays" label="Default terms (days)" error={fields.paymentTermsDays} hint="0 = due on receipt; 15 and 30 read as net 15 and net 30.">{(p) => <input {...p} inputMode="numeric" value={v.terms} onChange={set('terms')} />}</Field>
        <Field id="invoicePrefix" label="Invoice number prefix" error={fields.invoicePrefix} hint="INV gives INV-0001, INV-0002, …">{(p) => <input {...p} value={v.prefix} onChange={set('prefix')} />}</Field>
      </section>
      <button className="btn-primary" type="submit">Save</button>
    </form>
  );
}
