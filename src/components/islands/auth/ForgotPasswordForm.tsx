import { useState, type SubmitEvent } from 'react';
import { z } from 'zod';
import { email } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

export default function ForgotPasswordForm() {
  const [value, setValue] = useState('');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [sent, setSent] = useState(false);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(z.object({ email }), { email: value });
    if (!v.ok) return setFields(v.fields);
    setFields({});
    const r = await api('/api/auth/request-password-reset', { body: { email: v.data.email, redirectTo: '/reset-password' } });
    if (r.ok) setSent(true);
    else setError(r.error.status === 429 ? 'Too many requests. Try again in a few minutes.' : r.error.message);
  }

  if (sent) {
    return <p className="rounded-md bg-moss-100 p-3 text-sm text-moss-700" role="status">If an account uses that e-mail, a link to choose a new password is on its way. It is good for one hour.</p>;
  }
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <FormError message={error} />
      <Field id="email" label="E-mail" error={fields.email}>
        {(p) => <input {...p} type="email" value={value} onChange={(e) => setValue(e.target.value)} autoComplete="email" />}
      </Field>
      <button type="submit" className="btn-primary w-full">Send the link</button>
    </form>
  );
}
