import { useState, type SubmitEvent } from 'react';
import { ROLES, ROLE_LABELS, type Role } from '../../../lib/auth/permissions';
import { inviteInput } from '../../../lib/auth/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface Member { memberId: string; userId: string; name: string; email: string; role: Role; joinedAt: string }
interface Invitation { id: string; email: string; role: Role; expiresAt: string }

export default function MembersManager({ initial, me }: { initial: { members: Member[]; invitations: Invitation[] }; me: string }) {
  const [members, setMembers] = useState(initial.members);
  const [invites, setInvites] = useState(initial.invitations);
  const [form, setForm] = useState<{ email: string; role: Role }>({ email: '', role: 'crew_lead' });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);

  async function refresh() {
    const r = await api<{ members: Member[]; invitations: Invitation[] }>('/api/members');
    if (r.ok) { setMembers(r.data.members); setInvites(r.data.invitations); }
  }

  async function invite(e: SubmitEvent) {
    e.preventDefault();
    setError(null); setNotice(null);
    const v = validate(inviteInput, form);
    if (!v.ok) return setFields(v.fields);
    setFields({});
    const r = await api('/api/members/invitations', { body: v.data });
    if (!r.ok) { setFields(r.error.fields ?? {}); setError(r.error.message); return; }
    setNotice(`Invitation sent to ${v.data.email}.`);
    setForm({ email: '', role: form.role });
    await refresh();
  }

  async function changeRole(m: Member, role: Role) {
    setError(null);
    const r = await api(`/api/members/${m.memberId}`, { method: 'PATCH', body: { role } });
    if (!r.ok) setError(r.error.message);
    await refresh();
  }

  async function remove(m: Member) {
    if (!window.confirm(`Remove ${m.name} from the company? They lose access at once.`)) return;
    const r = await api(`/api/members/${m.memberId}`, { method: 'DELETE' });
    if (!r.ok) setError(r.error.message);
    await refresh();
  }

  async function cancel(i: Invitation) {
    const r = await api(`/api/members/invitations/${i.id}`, { method: 'DELETE' });
    if (!r.ok) setError(r.error.message);
    await refresh();
  }

  return (
    <div className="space-y-6">
      <FormError message={error} />
      {notice && <p role="status" className="rounded-md bg-moss-100 px-3 py-2 text-sm text-moss-700">{notice}</p>}
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead><tr><th>Name</th><th>E-mail</th><th>Role</th><th><span className="sr-only">Actions</span></th></tr></thead>
          <tbody>
            {members.map((m) => (
              <tr key={m.memberId} data-testid={`member-${m.email}`}>
                <td>{m.name}{m.userId === me && <span className="text-galv-500"> (you)</span>}</td>
                <td>{m.email}</td>
                <td>
                  <label className="sr-only" htmlFor={`role-${m.memberId}`}>Role of {m.name}</label>
                  <select id={`role-${m.memberId}`} className="input py-1" value={m.role} onChange={(e) => changeRole(m, e.target.value as Role)}>
                    {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
                  </select>
                </td>
                <td className="text-right">{m.userId !== me && <button type="button" className="btn-danger py-1" onClick={() => remove(m)}>Remove</button>}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <section className="card">
        <h2 className="mb-3">Invite someone</h2>
        <form onSubmit={invite} noValidate className="grid items-start gap-3 sm:grid-cols-[1fr_12rem_auto]">
          <Field id="invite-email" label="E-mail" error={fields.email}>
            {(p) => <input {...p} type="email" value={form.email} onChange={(e) => setForm({ ...form, email: e.target.value })} />}
          </Field>
          <Field id="invite-role" label="Role" error={fields.role}>
            {(p) => (
              <select {...p} value={form.role} onChange={(e) => setForm({ ...form, role: e.target.value as Role })}>
                {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
              </select>
            )}
          </Field>
          <button type="submit" className="btn-primary sm:mt-6">Send invitation</button>
        </form>
      </section>
      {invites.length > 0 && (
        <section>
          <h2 className="mb-2">Waiting for an answer</h2>
          <ul className="space-y-2">
            {invites.map((i) => (
              <li key={i.id} className="card flex items-center justify-between p-3 text-sm">
                <span>{i.email} · {ROLE_LABELS[i.role] ?? i.role} · until {new Date(i.expiresAt).toLocaleDateString('en-US')}</span>
                <button type="button" className="btn-secondary py-1" onClick={() => cancel(i)}>Cancel</button>
              </li>
            ))}
          </ul>
        </section>
      )}
    </div>
  );
}
