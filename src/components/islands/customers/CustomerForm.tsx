import { useState, type SubmitEvent } from 'react';
import { customerInput, type Customer } from '../../../lib/customers/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

const KEYS = ['name', 'email', 'phone', 'billingLine1', 'billingLine2', 'billingCity', 'billingRegion', 'billingPostal', 'siteLine1', 'siteCity', 'siteRegion', 'sitePostal', 'notes'] as const;
type Key = (typeof KEYS)[number];

export default function CustomerForm({ customer }: { customer?: Customer | null }) {
  const [values, setValues] = useState<Record<Key, string>>(() => Object.fromEntries(KEYS.map((k) => [k, (customer?.[k] as string | null) ?? ''])) as Record<Key, string>);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const input = (k: Key, label: string, type = 'text') => (
    <Field id={k} label={label} error={fields[k]}>
      {(p) => <input {...p} type={type} value={values[k]} onChange={(e) => setValues({ ...values, [k]: e.target.value })} />}
    </Field>
  );

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(customerInput, values);
    if (!v.ok) { setFields(v.fields); setError('Some fields need attention.'); return; }
    setFields({}); setError(null); setBusy(true);
    const r = customer
      ? await api<Customer>(`/api/customers/${customer.id}`, { method: 'PATCH', body: v.data })
      : await api<Customer>('/api/customers', { body: v.data });
    if (r.ok) { window.location.href = `/customers/${r.data.id}`; return; }
    setBusy(false); setFields(r.error.fields ?? {}); setError(r.error.message);
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-6" data-testid="customer-form">
      <FormError message={error} />
      <section className="grid gap-4 sm:grid-cols-3">
        {input('name', 'Name')}
        {input('email', 'E-mail', 'email')}
        {input('phone', 'Phone', 'tel')}
      </section>
      <section>
        <h2 className="mb-2">Billing address</h2>
        <div className="grid gap-4 sm:grid-cols-3">
          {input('billingLine1', 'Street')}
          {input('billingLine2', 'Unit or suite')}
          {input('billingCity', 'Town')}
          {input('billingRegion', 'State')}
          {input('billingPostal', 'ZIP')}
        </div>
      </section>
      <section>
        <h2 className="mb-2">Usual site</h2>
        <div className="grid gap-4 sm:grid-cols-4">
          {input('siteLine1', 'Street')}
          {input('siteCity', 'Town')}
          {input('siteRegion', 'State')}
          {input('sitePostal', 'ZIP')}
        </div>
      </section>
      <Field id="notes" label="Notes" error={fields.notes}>
        {(p) => <textarea {...p} rows={3} value={values.notes} onChange={(e) => setValues({ ...values, notes: e.target.value })} />}
      </Field>
      <div className="flex gap-3">
        <button className="btn-primary" type="submit" disabled={busy}>{customer ? 'Save the customer' : 'Add the customer'}</button>
        <a className="btn-secondary" href={customer ? `/customers/${customer.id}` : '/customers'}>Cancel</a>
      </div>
    </form>
  );
}
