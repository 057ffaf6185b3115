import { useState, type SubmitEvent } from 'react';
import { z } from 'zod';
import { email as emailSchema, password } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface Props {
  invitationId: string;
  invitedEmail: string | null;
  company: string | null;
  role: string | null;
  signedInAs: string | null;
}

const newAccount = z.object({ name: z.string().trim().min(1, 'Enter your name.').max(120), email: emailSchema, password });

/** Accepts an invitation: signed in as the invited address, or after creating an account for it. */
export default function AcceptInvite({ invitationId, invitedEmail, company, role, signedInAs }: Props) {
  const [values, setValues] = useState({ name: '', email: invitedEmail ?? '', password: '' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function accept() {
    const r = await api('/api/auth/organization/accept-invitation', { body: { invitationId } });
    if (!r.ok) {
      setBusy(false);
      setError(r.error.message);
      return;
    }
    await api('/api/companies/switch', { body: { organizationId: (r.data as { member?: { organizationId: string } }).member?.organizationId ?? '' } });
    window.location.href = '/';
  }

  async function signUpAndAccept(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(newAccount, values);
    if (!v.ok) return setFields(v.fields);
    setFields({});
    setBusy(true);
    const r = await api('/api/auth/sign-up/email', { body: v.data });
    if (!r.ok) {
      setBusy(false);
      setError(r.error.code === 'USER_ALREADY_EXISTS' ? 'That e-mail already has an account: sign in first, then open this link again.' : r.error.message);
      return;
    }
    await accept();
  }

  if (!company) return <FormError message="This invitation is not valid any more. Ask the company's owner for a new one." />;

  return (
    <div className="space-y-4">
      <p>You are invited to join <b>{company}</b> as <b>{role}</b>.</p>
      <FormError message={error} />
      {signedInAs ? (
        signedInAs === invitedEmail ? (
          <button type="button" className="btn-primary w-full" disabled={busy} onClick={() => { setBusy(true); void accept(); }}>Join {company}</button>
        ) : (
          <p className="text-sm">You are signed in as {signedInAs}, but the invitation is for {invitedEmail}. Sign out and open this link again.</p>
        )
      ) : (
        <form onSubmit={signUpAndAccept} noValidate className="space-y-4">
          <p className="text-sm text-galv-600">Create your account, or <a href={`/sign-in?next=${encodeURIComponent(`/accept-invite/${invitationId}`)}`}>sign in</a> if you have one.</p>
          <Field id="name" label="Your name" error={fields.name}>
            {(p) => <input {...p} value={values.name} onChange={(e) => setValues({ ...values, name: e.target.value })} autoComplete="name" />}
          </Field>
          <Field id="email" label="E-mail" error={fields.email}>
            {(p) => <input {...p} type="email" value={values.email} readOnly={Boolean(invitedEmail)} onChange={(e) => setValues({ ...values, email: e.target.value })} />}
          </Field>
          <Field id="password" label="Password" error={fields.password} hint="At least 10 characters.">
            {(p) => <input {...p} type="password" value={values.password} onChange={(e) => setValues({ ...values, password: e.target.value })} autoComplete="new-password" />}
          </Field>
          <button type="submit" className="btn-primary w-full" disabled={busy}>Create account and join</button>
        </form>
      )}
    </div>
  );
}
