import { useState, type SubmitEvent } from 'react';
import { changePasswordInput } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

/** Changes the password; every other session of this person ends. */
export default function ChangePasswordForm() {
  const [values, setValues] = useState({ currentPassword: '', newPassword: '' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const [busy, setBusy] = useState(false);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null);
    const v = validate(changePasswordInput, values);
    if (!v.ok) return setFields(v.fields);
    setFields({});
    setBusy(true);
    const r = await api('/api/account/password', { body: v.data });
    setBusy(false);
    if (r.ok) {
      setDone(true);
      setValues({ currentPassword: '', newPassword: '' });
      return;
    }
    setFields(r.error.fields ?? {});
    setError(r.error.message);
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4" data-testid="change-password-form">
      <FormError message={error} />
      {done && <p role="status" className="rounded-md bg-moss-100 p-3 text-sm text-moss-700">Your password is changed. Every other device you were signed in on is signed out.</p>}
      <Field id="currentPassword" label="Current password" error={fields.currentPassword}>
        {(p) => <input {...p} type="password" autoComplete="current-password" value={values.currentPassword} onChange={(e) => setValues({ ...values, currentPassword: e.target.value })} />}
      </Field>
      <Field id="newPassword" label="New password" error={fields.newPassword} hint="At least 10 characters.">
        {(p) => <input {...p} type="password" autoComplete="new-password" value={values.newPassword} onChange={(e) => setValues({ ...values, newPassword: e.target.value })} />}
      </Field>
      <button type="submit" className="btn-primary" disabled={busy}>{busy ? 'Saving…' : 'Change the password'}</button>
    </form>
  );
}
