import { useState, type SubmitEvent } from 'react';
import { JOB_STATUSES, JOB_STATUS_LABELS, jobInput, type Job } from '../../../lib/jobs/schema';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';

interface Option { id: number | string; name: string }
interface Props {
  job?: Job | null;
  customers: Option[];
  styles: Option[];
  estimators: Option[];
  crewLeads: Option[];
  presetCustomerId?: number | null;
}

type Values = Record<string, string | boolean>;

function initialValues(job: Job | null | undefined, presetCustomerId?: number | null): Values {
  return {
    code: job?.code ?? '',
    title: job?.title ?? '',
    customerId: job ? String(job.customerId) : presetCustomerId ? String(presetCustomerId) : '',
    fenceStyleId: job?.fenceStyleId ? String(job.fenceStyleId) : '',
    status: job?.status ?? 'lead',
    commercial: job?.commercial ?? false,
    estimatorUserId: job?.estimatorUserId ?? '',
    crewLeadUserId: job?.crewLeadUserId ?? '',
    siteLine1: job?.siteLine1 ?? '',
    siteCity: job?.siteCity ?? '',
    siteRegion: job?.siteRegion ?? '',
    sitePostal: job?.sitePostal ?? '',
    leadDate: job?.leadDate ?? new Date().toISOString().slice(0, 10),
    measureDate: job?.measureDate ?? '',
    bidDate: job?.bidDate ?? '',
    decidedDate: job?.decidedDate ?? '',
    startDate: job?.startDate ?? '',
    completedDate: job?.completedDate ?? '',
    closedDate: job?.closedDate ?? '',
    notes: job?.notes ?? '',
  };
}

const DATES: [string, string][] = [
  ['leadDate', 'Lead'], ['measureDate', 'Site measure'], ['bidDate', 'Bid sent'], ['decidedDate', 'Won or lost'],
  ['startDate', 'Start'], ['completedDate', 'Completed'], ['closedDate', 'Closed'],
];

/** Create or edit a job; the same zod schema as POST /api/jobs checks it before sending. */
export default function JobForm({ job, customers, styles, estimators, crewLeads, presetCustomerId }: Props) {
  const [values, setValues] = useState<Values>(() => initialValues(job, presetCustomerId));
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (k: string) => (e: { target: { value: string } }) => setValues((v) => ({ ...v, [k]: e.target.value }));
  const text = (k: string) => String(values[k] ?? '');

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null);
    const v = validate(jobInput, values);
    if (!v.ok) {
      setFields(v.fields);
      setError('Some fields need attention.');
      return;
    }
    setFields({});
    setBusy(true);
    const r = job
      ? await api<Job>(`/api/jobs/${job.id}`, { method: 'PATCH', body: v.data })
      : await api<Job>('/api/jobs', { method: 'POST', body: v.data });
    if (r.ok) {
      window.location.href = `/jobs/${r.data.id}`;
      return;
    }
    setBusy(false);
    setFields(r.error.fields ?? {});
    setError(r.error.message);
  }

  const select = (k: string, label: string, options: Option[], empty: string) => (
    <Field id={k} label={label} error={fields[k]}>
      {(p) => (
        <select {...p} value={text(k)} onChange={set(k)}>
          <option value="">{empty}</option>
          {options.map((o) => <option key={o.id} value={o.id}>{o.name}</option>)}
        </select>
      )}
    </Field>
  );

  return (
    <form onSubmit={submit} noValidate className="space-y-6" data-testid="job-form">
      <FormError message={error} />
      <section className="grid gap-4 sm:grid-cols-2">
        <Field id="title" label="Title" error={fields.title}>
          {(p) => <input {...p} value={text('title')} onChange={set('title')} placeholder="Back yard privacy fence" />}
        </Field>
        <Field id="code" label="Job code" error={fields.code} hint={job ? undefined : 'Leave empty for the next number.'}>
          {(p) => <input {...p} value={text('code')} onChange={set('code')} placeholder="J-0142" />}
        </Field>
        {select('customerId', 'Customer', customers, 'Choose the customer')}
        {select('fenceStyleId', 'Fence style', styles, 'Not chosen yet')}
        <Field id="status" label="Status" error={fields.status}>
          {(p) => (
            <select {...p} value={text('status')} onChange={set('status')}>
              {JOB_STATUSES.map((s) => <option key={s} value={s}>{JOB_STATUS_LABELS[s]}</option>)}
            </select>
          )}
        </Field>
        <label className="flex items-center gap-2 self-end pb-2 text-sm">
          <input type="checkbox" checked={Boolean(values.commercial)} onChange={(e) => setValues((v) => ({ ...v, commercial: e.target.checked }))} />
          Commercial job (progress billing with retainage)
        </label>
        {select('estimatorUserId', 'Estimator', estimators, 'Nobody yet')}
        {select('crewLeadUserId', 'Crew lead', crewLeads, 'Nobody yet')}
      </section>
      <section>
        <h2 className="mb-2">Site</h2>
        <div className="grid gap-4 sm:grid-cols-4">
          <div className="sm:col-span-2">
            <Field id="siteLine1" label="Street" error={fields.siteLine1}>{(p) => <input {...p} value={text('siteLine1')} onChange={set('siteLine1')} />}</Field>
          </div>
          <Field id="siteCity" label="Town" error={fields.siteCity}>{(p) => <input {...p} value={text('siteCity')} onChange={set('siteCity')} />}</Field>
          <div className="grid grid-cols-2 gap-2">
            <Field id="siteRegion" label="State" error={fields.siteRegion}>{(p) => <input {...p} value={text('siteRegion')} onChange={set('siteRegion')} />}</Field>
            <Field id="sitePostal" label="ZIP" error={fields.sitePostal}>{(p) => <input {...p} value={text('sitePostal')} onChange={set('sitePostal')} />}</Field>
          </div>
        </div>
      </section>
      <section>
        <h2 className="mb-2">Key dates</h2>
        <div className="grid gap-4 sm:grid-cols-4">
          {DATES.map(([k, label]) => (
            <Field key={k} id={k} label={label} error={fields[k]}>{(p) => <input {...p} type="date" value={text(k)} onChange={set(k)} />}</Field>
          ))}
        </div>
      </section>
      <Field id="notes" label="Notes" error={fields.notes}>
        {(p) => <textarea {...p} rows={4} value={text('notes')} onChange={set('notes')} placeholder="Gate swing, dogs, slope, access for the auger…" />}
      </Field>
      <div className="flex gap-3">
        <button type="submit" className="btn-primary" disabled={busy}>{busy ? 'Saving…' : job ? 'Save the job' : 'Create the job'}</button>
        <a href={job ? `/jobs/${job.id}` : '/jobs'} className="btn-secondary">Cancel</a>
      </div>
    </form>
  );
}
