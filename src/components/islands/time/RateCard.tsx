import { useState } from 'react';
import { EQUIPMENT_LABELS } from '../../../lib/rentals/rates';
import { rateCardInput, type RateCardRow } from '../../../lib/rentals/schema';
import { api } from '../ui/api';
import { FormError } from '../ui/Field';
import { validate } from '../ui/form';
import { Notice } from '../costs/ui';

const text = (c: number | null) => (c === null ? '' : (c / 100).toFixed(2));

/** The company's usual rental rates; a rental logged without rates is priced from these. */
export default function RateCard({ initial, mayWrite }: { initial: RateCardRow[]; mayWrite: boolean }) {
  const [rows, setRows] = useState(initial.map((r) => ({ kind: r.kind, halfDayCents: text(r.halfDayCents), dayCents: text(r.dayCents), weekCents: text(r.weekCents) })));
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);

  async function save() {
    setError(null); setNotice(null);
    const v = validate(rateCardInput, { rates: rows });
    if (!v.ok) { setFields(v.fields); setError('Some rates need attention.'); return; }
    setFields({});
    const r = await api('/api/rentals/rates', { method: 'PUT', body: v.data });
    if (!r.ok) { setError(r.error.message); setFields(r.error.fields ?? {}); return; }
    setNotice('Rate card saved. Rentals logged from now on use it.');
  }

  return (
    <div className="space-y-3">
      <FormError message={error} />
      {notice && <Notice>{notice}</Notice>}
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense">
          <thead><tr><th>Equipment</th><th className="num">Half day</th><th className="num">Day</th><th className="num">Week</th></tr></thead>
          <tbody>
            {rows.map((r, i) => (
              <tr key={r.kind}>
                <td>{EQUIPMENT_LABELS[r.kind]}</td>
                {(['halfDayCents', 'dayCents', 'weekCents'] as const).map((k) => (
                  <td key={k} className="num">
                    <input className={`input w-24 py-1 text-right ${fields[`rates.${i}.${k}`] ? 'input-error' : ''}`} inputMode="decimal" disabled={!mayWrite} aria-label={`${EQUIPMENT_LABELS[r.kind]} ${k.replace('Cents', '')}`} value={r[k]} onChange={(e) => setRows(rows.map((x, j) => (j === i ? { ...x, [k]: e.target.value } : x)))} />
                    {fields[`rates.${i}.${k}`] && <span className="field-error block text-xs">{fields[`rates.${i}.${k}`]}</span>}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {mayWrite && <button type="button" className="btn-primary" onClick={save}>Save the rate card</button>}
    </div>
  );
}
