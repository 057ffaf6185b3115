import { useState, type SubmitEvent } from 'react';
import { workerInput, type Worker } from '../../../lib/labour/schema';
import { burdenedRateCents } from '../../../lib/labour/cost';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';
import { Money, Notice } from '../costs/ui';

interface Props {
  initial: Worker[];
  crewLeads: { id: string; name: string }[];
  burdenPct: number;
  mayWrite: boolean;
}

const blank = { id: null as number | null, name: '', wageCents: '', crewLeadUserId: '', active: true, notes: '' };

/** Crew members and their hourly wages; an hour costs wage × (1 + the company's labour burden). */
export default function WorkersManager({ initial, crewLeads, burdenPct, mayWrite }: Props) {
  const [workers, setWorkers] = useState(initial);
  const [v, setV] = useState(blank);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);

  async function refresh() {
    const r = await api<{ items: Worker[] }>('/api/workers');
    if (r.ok) setWorkers(r.data.items);
  }

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null); setNotice(null);
    const { id, ...values } = v;
    const checked = validate(workerInput, values);
    if (!checked.ok) { setFields(checked.fields); setError('Some fields need attention.'); return; }
    setFields({});
    const r = id ? await api<Worker>(`/api/workers/${id}`, { method: 'PATCH', body: checked.data }) : await api<Worker>('/api/workers', { body: checked.data });
    if (!r.ok) { setFields(r.error.fields ?? {}); setError(r.error.message); return; }
    setNotice(id ? `Saved ${r.data.name}. Hours logged from now on use the new wage.` : `Added ${r.data.name}.`);
    setV(blank);
    await refresh();
  }

  return (
    <div className="space-y-4">
      {notice && <Notice>{notice}</Notice>}
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead><tr><th>Name</th><th>Crew</th><th className="num">Wage</th><th className="num">An hour costs</th><th className="num">Hours logged</th><th>State</th>{mayWrite && <th />}</tr></thead>
          <tbody>
            {workers.map((w) => (
              <tr key={w.id} className={w.active ? '' : 'text-galv-500'}>
                <td className="font-medium">{w.name}</td>
                <td>{w.crewLeadName ?? '—'}</td>
                <td className="num"><Money cents={w.wageCents} /></td>
                <td className="num"><Money cents={burdenedRateCents(w.wageCents, burdenPct)} /></td>
                <td className="num">{w.hoursLogged}</td>
                <td>{w.active ? 'Active' : 'Left'}</td>
                {mayWrite && <td><button type="button" className="text-xs underline" onClick={() => setV({ id: w.id, name: w.name, wageCents: (w.wageCents / 100).toFixed(2), crewLeadUserId: w.crewLeadUserId ?? '', active: w.active, notes: w.notes ?? '' })}>Change</button></td>}
              </tr>
            ))}
            {workers.length === 0 && <tr><td colSpan={7} className="py-6 text-center text-galv-500">No workers yet.</td></tr>}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-galv-500">An hour costs the wage × (1 + {burdenPct} % labour burden for payroll taxes, insurance and benefits), from the company settings.</p>
      {mayWrite && (
        <form onSubmit={submit} noValidate className="card space-y-3" aria-label={v.id ? 'Change a worker' : 'Add a worker'}>
          <h2>{v.id ? `Change ${v.name}` : 'Add a worker'}</h2>
          <FormError message={error} />
          <div className="grid gap-3 sm:grid-cols-3">
            <Field id="w-name" label="Name" error={fields.name}>{(p) => <input {...p} value={v.name} onChange={(e) => setV({ ...v, name: e.target.value })} />}</Field>
            <Field id="w-wage" label="Hourly wage" error={fields.wageCents}>{(p) => <input {...p} inputMode="decimal" placeholder="24.50" value={v.wageCents} onChange={(e) => setV({ ...v, wageCents: e.target.value })} />}</Field>
            <Field id="w-lead" label="Crew" error={fields.crewLeadUserId}>{(p) => (
              <select {...p} value={v.crewLeadUserId} onChange={(e) => setV({ ...v, crewLeadUserId: e.target.value })}>
                <option value="">No crew lead in Tallypost</option>
                {crewLeads.map((c) => <option key={c.id} value={c.id}>{c.name}’s crew</option>)}
              </select>
            )}</Field>
          </div>
          <label className="flex items-center gap-2 text-sm"><input type="checkbox" checked={v.active} onChange={(e) => setV({ ...v, active: e.target.checked })} /> Active (shows on the crew’s time form)</label>
          <div className="flex gap-2">
            <button type="submit" className="btn-primary">{v.id ? 'Save' : 'Add the worker'}</button>
            {v.id && <button type="button" className="btn-secondary" onClick={() => setV(blank)}>Cancel</button>}
          </div>
        </form>
      )}
    </div>
  );
}
