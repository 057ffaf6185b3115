import { useState, type SubmitEvent } from 'react';
import { manualCostInput } from '../../../lib/costs/schema';
import type { CostCategory } from '../../../lib/costs/categories';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';
import { CategorySelect, JobSelect, Notice, type JobOption } from './ui';

interface Props {
  jobs: JobOption[];
  suppliers: { id: number; name: string }[];
  today: string;
  presetJobId?: number | null;
  onSaved?: () => void;
}

/** Permit and dump fees, subcontractors: costs with no receipt file, entered by hand. */
export default function ManualCostForm({ jobs, suppliers, today, presetJobId = null, onSaved }: Props) {
  const blank = { jobId: presetJobId ?? ('' as number | ''), overhead: false, category: 'permit' as CostCategory, date: today, description: '', supplierId: '' as number | '', amountCents: '' };
  const [v, setV] = useState(blank);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null); setNotice(null);
    const checked = validate(manualCostInput, { ...v, jobId: v.overhead ? null : v.jobId, supplierId: v.supplierId });
    if (!checked.ok) { setFields(checked.fields); setError('Some fields need attention.'); return; }
    setFields({});
    setBusy(true);
    const r = await api('/api/costs', { body: checked.data });
    setBusy(false);
    if (!r.ok) { setFields(r.error.fields ?? {}); setError(r.error.message); return; }
    setNotice(`Added: ${checked.data.description}.`);
    setV({ ...blank, jobId: v.jobId, category: v.category, date: v.date });
    onSaved?.();
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-3" aria-label="Add another cost">
      <FormError message={error} />
      {notice && <Notice>{notice}</Notice>}
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
        <Field id="mc-job" label="Job" error={fields.jobId}>{(p) => <JobSelect jobs={jobs} value={v.overhead ? '' : v.jobId} onChange={(jobId) => setV({ ...v, jobId })} id={p.id} className={p.className} empty={v.overhead ? 'Overhead (no job)' : 'Choose a job'} />}</Field>
        <Field id="mc-category" label="Category" error={fields.category}>{(p) => <CategorySelect id={p.id} value={v.category} onChange={(category) => setV({ ...v, category })} className={p.className} />}</Field>
        <Field id="mc-date" label="Date" error={fields.date}>{(p) => <input {...p} type="date" value={v.date} onChange={(e) => setV({ ...v, date: e.target.value })} />}</Field>
        <Field id="mc-description" label="What it was for" error={fields.description}>{(p) => <input {...p} value={v.description} placeholder="Dump fee, old fence tear-out" onChange={(e) => setV({ ...v, description: e.target.value })} />}</Field>
        <Field id="mc-supplier" label="Paid to (optional)" error={fields.supplierId}>{(p) => (
          <select {...p} value={v.supplierId} onChange={(e) => setV({ ...v, supplierId: e.target.value ? Number(e.target.value) : '' })}>
            <option value="">—</option>
            {suppliers.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        )}</Field>
        <Field id="mc-amount" label="Amount" hint="A credit or refund as -45.00 or (45.00)" error={fields.amountCents}>{(p) => <input {...p} inputMode="decimal" value={v.amountCents} placeholder="125.00" onChange={(e) => setV({ ...v, amountCents: e.target.value })} />}</Field>
      </div>
      <div className="flex flex-wrap items-center gap-4">
        <label className="flex items-center gap-2 text-sm"><input type="checkbox" checked={v.overhead} onChange={(e) => setV({ ...v, overhead: e.target.checked })} /> Overhead: belongs to no job</label>
        <button type="submit" className="btn-primary" disabled={busy}>Add the cost</button>
      </div>
    </form>
  );
}
