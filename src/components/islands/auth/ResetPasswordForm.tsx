import { useState, type SubmitEvent } from 'react';
import { z } from 'zod';
import { password } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

export default function ResetPasswordForm({ token }: { token: string | null }) {
  const [value, setValue] = useState('');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(token ? null : 'This link has no token. Ask for a new one.');
  const [done, setDone] = useState(false);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(z.object({ password }), { password: value });
    if (!v.ok) return setFields(v.fields);
    setFields({});
    const r = await api('/api/auth/reset-password', { body: { newPassword: v.data.password, token } });
    if (r.ok) setDone(true);
    else setError(r.error.code === 'INVALID_TOKEN' ? 'This link has expired or was used already. Ask for a new one.' : r.error.message);
  }

  if (done) return <p role="status" className="rounded-md bg-moss-100 p-3 text-sm text-moss-700">Your password is changed. <a href="/sign-in">Sign in</a> with it.</p>;
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <FormError message={error} />
      <Field id="password" label="New password" error={fields.password} hint="At least 10 characters.">
        {(p) => <input {...p} type="password" value={value} onChange={(e) => setValue(e.target.value)} autoComplete="new-password" />}
      </Field>
      <button type="submit" className="btn-primary w-full" disabled={!token}>Save the new password</button>
    </form>
  );
}
