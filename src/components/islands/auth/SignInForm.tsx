import { useState, type SubmitEvent } from 'react';
import { signInInput } from '../../../lib/auth/schema';
import { nextOrHome } from '../../../lib/auth/safe-path';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';


export default function SignInForm({ next }: { next: string | null }) {
  const [values, setValues] = useState({ email: '', password: '' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null);
    const v = validate(signInInput, values);
    if (!v.ok) return setFields(v.fields);
    setFields({});
    setBusy(true);
    const r = await api('/api/auth/sign-in/email', { body: v.data });
    if (r.ok) {
      window.location.href = nextOrHome(next);
      return;
    }
    setBusy(false);
    setError(
      r.error.status === 429 ? 'Too many attempts. Wait a minute and try again.'
        : r.error.status === 401 ? 'That e-mail and password do not match an account.'
          : r.error.code === 'EMAIL_NOT_VERIFIED' ? `Confirm your e-mail address first: we have just sent a new link to ${v.data.email}. It signs you in.`
            : r.error.message,
    );
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4" data-testid="sign-in-form">
      <FormError message={error} />
      <Field id="email" label="E-mail" error={fields.email}>
        {(p) => <input {...p} type="email" autoComplete="username" value={values.email} onChange={(e) => setValues({ ...values, email: e.target.value })} />}
      </Field>
      <Field id="password" label="Password" error={fields.password}>
        {(p) => <input {...p} type="password" autoComplete="current-password" value={values.password} onChange={(e) => setValues({ ...values, password: e.target.value })} />}
      </Field>
      <button type="submit" className="btn-primary w-full" disabled={busy}>{busy ? 'Signing in…' : 'Sign in'}</button>
    </form>
  );
}
