import { useState, type SubmitEvent } from 'react';
import { signUpInput } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

export default function SignUpForm() {
  const [values, setValues] = useState({ name: '', email: '', password: '', companyName: '' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const set = (k: keyof typeof values) => (e: { target: { value: string } }) => setValues({ ...values, [k]: e.target.value });

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null);
    const v = validate(signUpInput, values);
    if (!v.ok) return setFields(v.fields);
    setFields({});
    setBusy(true);
    const r = await api('/api/signup', { body: v.data });
    if (r.ok) {
      setSentTo(v.data.email);
      return;
    }
    setBusy(false);
    setFields(r.error.fields ?? {});
    setError(r.error.message);
  }

  if (sentTo) {
    return (
      <p role="status" className="rounded-md bg-moss-100 p-3 text-sm text-moss-700" data-testid="sign-up-sent">
        Check your e-mail: we sent a link to <b>{sentTo}</b>. Open it to confirm the address; it signs you in to your
        company. The link is good for 24 hours.
      </p>
    );
  }
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <FormError message={error} />
      <Field id="companyName" label="Company name" error={fields.companyName}>
        {(p) => <input {...p} value={values.companyName} onChange={set('companyName')} autoComplete="organization" />}
      </Field>
      <Field id="name" label="Your name" error={fields.name}>
        {(p) => <input {...p} value={values.name} onChange={set('name')} autoComplete="name" />}
      </Field>
      <Field id="email" label="E-mail" error={fields.email}>
        {(p) => <input {...p} type="email" value={values.email} onChange={set('email')} autoComplete="email" />}
      </Field>
      <Field id="password" label="Password" error={fields.password} hint="At least 10 characters.">
        {(p) => <input {...p} type="password" value={values.password} onChange={set('password')} autoComplete="new-password" />}
      </Field>
      <button type="submit" className="btn-primary w-full" disabled={busy}>{busy ? 'Creating…' : 'Create the company'}</button>
    </form>
  );
}
