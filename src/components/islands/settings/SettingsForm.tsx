import { useState, type SubmitEvent } from 'react';
import { settingsInput, TAX_MODES, TAX_MODE_LABELS, TIME_ZONES, type CompanySettings } from '../../../lib/settings/schema';

const WEEKDAYS = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];
const INCH_KEYS = ['frostDepthIn', 'permitMaxFrontIn', 'permitMaxSideIn', 'permitMaxBackIn'] as const;
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

const TEXT_KEYS = ['addressLine', 'city', 'region', 'postalCode', 'phone', 'email', 'licenseNumber'] as const;

export default function SettingsForm({ initial }: { initial: CompanySettings }) {
  const [v, setV] = useState<Record<string, string>>(() => ({
    currency: initial.currency,
    paymentTermsDays: String(initial.paymentTermsDays),
    targetMarginPct: String(initial.targetMarginPct),
    labourBurdenPct: String(initial.labourBurdenPct),
    costFlagPct: String(initial.costFlagPct),
    taxMode: initial.taxMode,
    taxRatePct: String(initial.taxRatePct),
    bidRoundingDollars: String(initial.bidRoundingCents / 100),
    timezone: initial.timezone,
    ...Object.fromEntries(TEXT_KEYS.map((k) => [k, initial[k] ?? ''])),
    ...Object.fromEntries(INCH_KEYS.map((k) => [k, initial[k] == null ? '' : String(initial[k])])),
    locateWaitBusinessDays: String(initial.locateWaitBusinessDays),
    locateValidDays: String(initial.locateValidDays),
    locateValidBasis: initial.locateValidBasis,
    holidays: initial.holidays.join('\n'),
  }));
  const [workdays, setWorkdays] = useState<number[]>(initial.businessDays);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const set = (k: string) => (e: { target: { value: string } }) => { setSaved(false); setV({ ...v, [k]: e.target.value }); };

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const { bidRoundingDollars, holidays, ...rest } = v;
    const values = {
      ...rest,
      bidRoundingCents: Math.round(Number(bidRoundingDollars) * 100),
      businessDays: workdays,
      holidays: holidays.split(/[\s,]+/).filter(Boolean),
    };
    const r0 = validate(settingsInput, values);
    if (!r0.ok) { setFields({ ...r0.fields, bidRoundingDollars: r0.fields.bidRoundingCents ?? '' }); return; }
    setFields({});
    const r = await api('/api/settings', { method: 'PATCH', body: r0.data });
    if (r.ok) { setSaved(true); setError(null); } else { setError(r.error.message); setFields(r.error.fields ?? {}); }
  }

  const input = (k: string, label: string, hint?: string, type = 'text') => (
    <Field id={k} label={label} error={fields[k]} hint={hint}>{(p) => <input {...p} type={type} value={v[k]} onChange={set(k)} />}</Field>
  );

  return (
    <form onSubmit={submit} noValidate className="space-y-6">
      <FormError message={error} />
      {saved && <p role="status" className="rounded-md bg-moss-100 px-3 py-2 text-sm text-moss-700">Settings saved.</p>}
      <section className="grid gap-4 sm:grid-cols-3">
        <Field id="currency" label="Currency" error={fields.currency}>
          {(p) => <select {...p} value={v.currency} onChange={set('currency')}><option value="USD">US dollar</option><option value="CAD">Canadian dollar</option></select>}
        </Field>
        {input('paymentTermsDays', 'Payment terms (days)', '0 means due on receipt.', 'number')}
        {input('targetMarginPct', 'Target gross margin (%)', 'Bids are priced to this margin unless the estimator changes it.', 'number')}
        {input('labourBurdenPct', 'Labour burden (%)', 'Payroll taxes, workers\' compensation, insurance and benefits on top of wages.', 'number')}
        {input('costFlagPct', 'Flag costs over estimate by (%)', 'Job costing marks a category whose actual cost runs more than this over its estimate.', 'number')}
        <Field id="taxMode" label="Sales tax on invoices" error={fields.taxMode}>
          {(p) => <select {...p} value={v.taxMode} onChange={set('taxMode')}>{TAX_MODES.map((m) => <option key={m} value={m}>{TAX_MODE_LABELS[m]}</option>)}</select>}
        </Field>
        {input('taxRatePct', 'Sales tax rate (%)', undefined, 'number')}
        {input('bidRoundingDollars', 'Round bid prices to the nearest ($)', 'e.g. 5 rounds $4,321.40 to $4,320.', 'number')}
        <Field id="timezone" label="Office time zone" error={fields.timezone} hint={'What "today" is for due dates, aging, reminders and locate tickets.'}>
          {(p) => (
            <select {...p} value={v.timezone} onChange={set('timezone')}>
              {!TIME_ZONES.some(([z]) => z === v.timezone) && <option value={v.timezone}>{v.timezone}</option>}
              {TIME_ZONES.map(([z, label]) => <option key={z} value={z}>{label} ({z})</option>)}
            </select>
          )}
        </Field>
      </section>
      <section>
        <h2 className="mb-2">On invoices and bids</h2>
        <div className="grid gap-4 sm:grid-cols-3">
          {input('addressLine', 'Street')}
          {input('city', 'Town')}
          {input('region', 'State')}
          {input('postalCode', 'ZIP')}
          {input('phone', 'Phone')}
          {input('email', 'E-mail')}
          {input('licenseNumber', 'Contractor licence number')}
        </div>
      </section>
      <section>
        <h2 className="mb-2">Digging, permits and the locate ticket</h2>
        <p className="mb-3 text-sm text-galv-600">Bids and the pre-dig checklist use these. They are the company's planning rules; local codes and the one-call centre's rules govern.</p>
        <div className="grid gap-4 sm:grid-cols-4">
          {input('frostDepthIn', 'Frost depth (in)', 'Posts go at least this deep. Empty: no minimum.', 'number')}
          {input('permitMaxFrontIn', 'No-permit limit, front yard (in)', 'Taller needs a permit. Empty: not set.', 'number')}
          {input('permitMaxSideIn', 'No-permit limit, side yard (in)', undefined, 'number')}
          {input('permitMaxBackIn', 'No-permit limit, back yard (in)', undefined, 'number')}
          {input('locateWaitBusinessDays', 'Wait after the call (business days)', 'Digging may start this many business days after the call.', 'number')}
          {input('locateValidDays', 'Ticket life (days)', 'Counted from the day it was called in.', 'number')}
          <Field id="locateValidBasis" label="Ticket life counted in" error={fields.locateValidBasis}>
            {(p) => <select {...p} value={v.locateValidBasis} onChange={set('locateValidBasis')}><option value="calendar">Calendar days</option><option value="business">Business days</option></select>}
          </Field>
        </div>
        <fieldset className="mt-4">
          <legend className="label">Business days</legend>
          <div className="flex flex-wrap gap-3 text-sm">
            {WEEKDAYS.map((d, i) => (
              <label key={d} className="flex items-center gap-1">
                <input type="checkbox" checked={workdays.includes(i)} onChange={() => { setSaved(false); setWorkdays((w) => (w.includes(i) ? w.filter((x) => x !== i) : [...w, i].sort())); }} /> {d}
              </label>
            ))}
          </div>
          {fields.businessDays && <p className="field-error" role="alert">{fields.businessDays}</p>}
        </fieldset>
        <div className="mt-4 max-w-md">
          <Field id="holidays" label="Holidays (one date a line, e.g. 2026-12-25)" error={fields.holidays ?? Object.entries(fields).find(([k]) => k.startsWith('holidays.'))?.[1]}>
            {(p) => <textarea {...p} rows={4} value={v.holidays} onChange={set('holidays')} />}
          </Field>
        </div>
      </section>
      <button className="btn-primary" type="submit">Save settings</button>
    </form>
  );
}
