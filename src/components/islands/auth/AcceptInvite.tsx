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

/**
 * Accepts an invitation. Only a signed-in person whose address is confirmed may join, so a
 * new account is confirmed first: the confirmation mail's link signs them in and brings them
 * back to this page.
 */
export default function AcceptInvite({ invitationId, invitedEmail, company, role, signedInAs }: Props) {
  const [values, setValues] = useState({ name: '', email: invitedEmail ?? '', password: '' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const here = `/accept-invite/${encodeURIComponent(invitationId)}`;

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

  async function signUp(e: SubmitEvent) {
    e.preventDefault();
    const v = validate(newAccount, values);
    if (!v.ok) return setFields(v.fields);
    setFields({});
    setBusy(true);
    const r = await api('/api/auth/sign-up/email', { body: { ...v.data, callbackURL: here } });
    setBusy(false);
    if (!r.ok) {
      setError(r.error.status === 429 ? 'Too many sign-ups from here. Try again in a minute.' : r.error.message);
      return;
    }
    setSentTo(v.data.email);
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
      ) : sentTo ? (
        <p role="status" className="rounded-md bg-moss-100 p-3 text-sm text-moss-700" data-testid="accept-invite-sent">
          Check your e-mail: we sent a link to <b>{sentTo}</b>. Open it to confirm the address; it signs you in and brings
          you back here to join {company}. If this address already has an account, <a href={`/sign-in?next=${encodeURIComponent(here)}`}>sign in</a> instead.
        </p>
      ) : (
        <form onSubmit={signUp} noValidate className="space-y-4">
          <p className="text-sm text-galv-600">Create your account, or <a href={`/sign-in?next=${encodeURIComponent(here)}`}>sign in</a> if you have one.</p>
          <Field id="name" label="Your name" error={fields.name}>
            {(p) => <input {...p} value={values.name} onChange={(e) => setValues({ ...values, name: e.target.value })} autoComplete="name" />}
          </Field>
          <Field id="email" label="E-mail" error={fields.email}>
            {(p) => <input {...p} type="email" value={values.email} readOnly={Boolean(invitedEmail)} onChange={(e) => setValues({ ...values, email: e.target.value })} />}
          </Field>
          <Field id="password" label="Password" error={fields.password} hint="At least 10 characters.">
            {(p) => <input {...p} type="password" value={values.password} onChange={(e) => setValues({ ...values, password: e.target.value })} autoComplete="new-password" />}
          </Field>
          <button type="submit" className="btn-primary w-full" disabled={busy}>Create account</button>
        </form>
      )}
    </div>
  );
}
