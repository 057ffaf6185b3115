import { useState } from 'react';
import type { checklistFor } from '../../../server/services/checklist';
import { checklistInput, gateAdvice } from '../../../lib/checklist/checklist';
import { formatDate } from '../../../lib/format';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { LocatePill } from '../ui/LocatePill';
import { validate } from '../ui/form';

type State = Awaited<ReturnType<typeof checklistFor>>;
interface Props { jobId: number; jobStatus: string; initial: State; canWrite: boolean; canOverride: boolean }


/** The pre-dig checklist: the locate ticket with its dates, permit, HOA and property line. */
export default function Checklist({ jobId, jobStatus, initial, canWrite, canOverride }: Props) {
  const [c, setC] = useState(initial);
  const [v, setV] = useState({
    locateTicketNumber: initial.locateTicketNumber ?? '', locateCalledOn: initial.locateCalledOn ?? '', permitRequired: initial.permitRequired,
    permitNumber: initial.permitNumber ?? '', hoaRequired: initial.hoaRequired, hoaApprovedOn: initial.hoaApprovedOn ?? '',
    propertyLineConfirmed: initial.propertyLineConfirmed, propertyLineNote: initial.propertyLineNote ?? '',
  });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const [reason, setReason] = useState('');
  const set = (patch: Partial<typeof v>) => { setSaved(false); setV({ ...v, ...patch }); };

  async function save() {
    const r0 = validate(checklistInput, v);
    if (!r0.ok) { setFields(r0.fields); return; }
    setFields({});
    const r = await api<State>(`/api/jobs/${jobId}/checklist`, { method: 'PATCH', body: r0.data });
    if (r.ok) { setC(r.data); setSaved(true); setError(null); } else { setError(r.error.message); setFields(r.error.fields ?? {}); }
  }
  async function override(clear = false) {
    const r = await api<State>(`/api/jobs/${jobId}/checklist-override`, clear ? { method: 'DELETE', body: {} } : { method: 'POST', body: { reason } });
    if (r.ok) { setC(r.data); setError(null); setFields({}); setReason(''); } else { setError(r.error.message); setFields(r.error.fields ?? {}); }
  }

  const ro = !canWrite;
  const advice = gateAdvice(c.locate.status, c.overrideReason, jobStatus);
  return (
    <div className="space-y-4" data-testid="checklist">
      <FormError message={error} />
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <LocatePill status={c.locate.status} />
        {c.locate.digFrom && <span>Dig from <strong>{formatDate(c.locate.digFrom)}</strong></span>}
        {c.locate.expiresOn && <span>Expires after <strong>{formatDate(c.locate.expiresOn)}</strong></span>}
        <span className="text-galv-500">Wait {c.rules.waitBusinessDays} business days after the call; the ticket lasts {c.rules.validDays} {c.rules.validBasis} days.</span>
      </div>
      <p className={`text-sm ${advice.ok ? 'text-moss-700' : 'text-rust-700'}`} data-testid="building-gate">{advice.message}</p>
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <Field id="locateTicketNumber" label="Locate ticket number" error={fields.locateTicketNumber}>
          {(p) => <input {...p} readOnly={ro} value={v.locateTicketNumber} onChange={(e) => set({ locateTicketNumber: e.target.value })} />}
        </Field>
        <Field id="locateCalledOn" label="Called in on" error={fields.locateCalledOn}>
          {(p) => <input {...p} type="date" readOnly={ro} value={v.locateCalledOn} onChange={(e) => set({ locateCalledOn: e.target.value })} />}
        </Field>
        <Field id="permitRequired" label="Permit needed" error={fields.permitRequired}
          hint={c.permitSuggestion.needed === true ? `The bid says yes: ${c.permitSuggestion.reasons.join('; ')}.` : c.permitSuggestion.needed === false ? 'The bid is within the no-permit heights.' : undefined}>
          {(p) => (
            <select {...p} disabled={ro} value={v.permitRequired} onChange={(e) => set({ permitRequired: e.target.value as typeof v.permitRequired })}>
              <option value="unknown">Not checked yet</option><option value="yes">Yes</option><option value="no">No</option>
            </select>
          )}
        </Field>
        <Field id="permitNumber" label="Permit number" error={fields.permitNumber}>
          {(p) => <input {...p} readOnly={ro} value={v.permitNumber} onChange={(e) => set({ permitNumber: e.target.value })} />}
        </Field>
        <label className="flex items-center gap-2 text-sm"><input type="checkbox" disabled={ro} checked={v.hoaRequired} onChange={(e) => set({ hoaRequired: e.target.checked })} /> HOA approval needed</label>
        {v.hoaRequired && (
          <Field id="hoaApprovedOn" label="HOA approved on" error={fields.hoaApprovedOn}>
            {(p) => <input {...p} type="date" readOnly={ro} value={v.hoaApprovedOn} onChange={(e) => set({ hoaApprovedOn: e.target.value })} />}
          </Field>
        )}
        <label className="flex items-center gap-2 text-sm sm:col-span-2"><input type="checkbox" disabled={ro} checked={v.propertyLineConfirmed} onChange={(e) => set({ propertyLineConfirmed: e.target.checked })} /> The owner confirmed the property line</label>
        <div className="sm:col-span-2">
          <Field id="propertyLineNote" label="How (survey pins, plat, owner's word)" error={fields.propertyLineNote}>
            {(p) => <input {...p} readOnly={ro} value={v.propertyLineNote} onChange={(e) => set({ propertyLineNote: e.target.value })} />}
          </Field>
        </div>
      </div>
      {canWrite && (
        <div className="flex items-center gap-3">
          <button type="button" className="btn-primary" onClick={save}>Save the checklist</button>
          {saved && <span role="status" className="text-sm text-moss-700">Saved.</span>}
        </div>
      )}
      {c.overrideReason && (
        <p className="rounded-md border border-rust-600 bg-rust-100 p-2 text-sm text-rust-700" data-testid="override">
          Owner override{c.overrideByName ? ` by ${c.overrideByName}` : ''}{c.overrideAt ? ` on ${formatDate(c.overrideAt)}` : ''}: {c.overrideReason}
          {canOverride && <button type="button" className="ml-2 underline" onClick={() => override(true)}>Withdraw</button>}
        </p>
      )}
      {canOverride && !c.overrideReason && c.locate.status !== 'ready' && c.locate.status !== 'waiting' && (
        <details className="text-sm">
          <summary className="cursor-pointer font-medium">Let this job build without a current locate ticket…</summary>
          <div className="mt-2 space-y-2">
            <Field id="reason" label="Written reason (kept on the job's record)" error={fields.reason}>
              {(p) => <textarea {...p} rows={2} value={reason} onChange={(e) => setReason(e.target.value)} />}
            </Field>
            <button type="button" className="btn-danger" onClick={() => override()}>Record the override</button>
          </div>
        </details>
      )}
      <p className="caution text-xs">Locate buried utilities before digging and hand-dig near the marks; private lines (irrigation, lighting, pet fence wire) are not marked. Permits and local codes govern. Computed depths and quantities are defaults, not an engineering approval.</p>
    </div>
  );
}
