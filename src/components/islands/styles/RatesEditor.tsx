import { useState } from 'react';
import { RATE_INFO, RATE_KINDS, ratesSchema, type RateKind, type Rates } from '../../../lib/takeoff/rates';
import type { RateVersion } from '../../../server/repos/rates';
import { formatDate, formatMoney } from '../../../lib/format';
import { fieldErrors } from '../../../lib/errors';
import { api } from '../ui/api';

interface Props { styleId: number; styleName: string; current: Rates; history: RateVersion[]; canWrite: boolean }

const show = (k: RateKind, v: number) => (k === 'crew_wage_cents' ? `${formatMoney(v)}/h` : String(Number(v.toFixed(4))));

/** One style's labour rates: change them as a new version with a reason; every version stays. */
export default function RatesEditor({ styleId, styleName, current: initialCurrent, history: initialHistory, canWrite }: Props) {
  const [current, setCurrent] = useState(initialCurrent);
  const [history, setHistory] = useState(initialHistory);
  const [open, setOpen] = useState(false);
  const [values, setValues] = useState<Record<string, string>>(() => Object.fromEntries(RATE_KINDS.map((k) => [k, k === 'crew_wage_cents' ? (initialCurrent[k] / 100).toFixed(2) : String(initialCurrent[k])])));
  const [reason, setReason] = useState('');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);

  async function save() {
    const parsedValues = Object.fromEntries(RATE_KINDS.map((k) => [k, k === 'crew_wage_cents' ? Math.round(Number(values[k]) * 100) : Number(values[k])]));
    const v = ratesSchema.safeParse(parsedValues);
    if (!v.success) { setFields(fieldErrors(v.error.issues)); return; }
    const changed = Object.fromEntries(RATE_KINDS.filter((k) => v.data[k] !== current[k]).map((k) => [k, v.data[k]]));
    if (!Object.keys(changed).length) { setFields({ _: 'Nothing changed.' }); return; }
    const r = await api<{ written: number; current: { values: Rates }; history: RateVersion[] }>(`/api/rates/${styleId}`, { body: { values: changed, reason } });
    if (!r.ok) { setFields(r.error.fields ?? { _: r.error.message }); return; }
    setCurrent(r.data.current.values);
    setHistory(r.data.history);
    setFields({});
    setReason('');
    setOpen(false);
    setMessage(`${r.data.written} new rate version${r.data.written === 1 ? '' : 's'} saved. New bids use them; saved bids keep theirs.`);
  }

  return (
    <section className="card space-y-3" aria-label={`Labour rates for ${styleName}`} data-testid={`rates-${styleId}`}>
      <div className="flex flex-wrap items-center gap-3">
        <h2 className="mr-auto">{styleName}</h2>
        {canWrite && !open && <button type="button" className="btn-secondary" onClick={() => setOpen(true)}>Change rates</button>}
      </div>
      {message && <p role="status" className="text-sm text-moss-700">{message}</p>}
      <div className="overflow-x-auto">
        <table className="table-dense">
          <thead><tr><th>Rate</th><th className="num">Now</th><th>Unit</th>{open && <th>New value</th>}</tr></thead>
          <tbody>
            {RATE_KINDS.map((k) => (
              <tr key={k}>
                <td>{RATE_INFO[k].label}</td>
                <td className="num">{show(k, current[k])}</td>
                <td className="text-xs text-galv-500">{k === 'crew_wage_cents' ? 'dollars per person-hour' : RATE_INFO[k].unit}</td>
                {open && (
                  <td>
                    <input className={`input w-28 ${fields[k] ? 'input-error' : ''}`} inputMode="decimal" aria-label={`New ${RATE_INFO[k].label}`} value={values[k]} onChange={(e) => setValues({ ...values, [k]: e.target.value })} />
                    {fields[k] && <span className="field-error block" role="alert">{fields[k]}</span>}
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {open && (
        <div className="space-y-2">
          <label className="block"><span className="label">Why (kept with each new version)</span>
            <input className={`input ${fields.reason ? 'input-error' : ''}`} value={reason} placeholder="e.g. Last five privacy jobs ran 12 % over on rails" onChange={(e) => setReason(e.target.value)} />
          </label>
          {(fields.reason || fields._) && <p className="field-error" role="alert">{fields.reason ?? fields._}</p>}
          <div className="flex gap-2">
            <button type="button" className="btn-primary" onClick={save}>Save as new versions</button>
            <button type="button" className="btn-secondary" onClick={() => { setOpen(false); setFields({}); }}>Cancel</button>
          </div>
        </div>
      )}
      <details>
        <summary className="cursor-pointer text-sm font-medium">History ({history.length} versions)</summary>
        <table className="table-dense mt-2">
          <thead><tr><th>When</th><th>Rate</th><th className="num">v</th><th className="num">Value</th><th>Who</th><th>Why</th></tr></thead>
          <tbody>
            {history.map((h) => (
              <tr key={h.id}><td className="whitespace-nowrap">{formatDate(h.createdAt)}</td><td>{RATE_INFO[h.kind]?.label ?? h.kind}</td><td className="num">{h.versionNo}</td><td className="num">{show(h.kind, h.value)}</td><td>{h.createdByName ?? '—'}</td><td className="text-xs">{h.reason}</td></tr>
            ))}
          </tbody>
        </table>
      </details>
    </section>
  );
}
