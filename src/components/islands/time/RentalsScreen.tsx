import { useState, type SubmitEvent } from 'react';
import { EQUIPMENT_KINDS, EQUIPMENT_LABELS, describePlan, rentalCost, rentalHours, type EquipmentKind } from '../../../lib/rentals/rates';
import { rentalInput, type RateCardRow, type Rental } from '../../../lib/rentals/schema';
import { parseMoney, toCents } from '../../../lib/csv/numbers';
import { api } from '../ui/api';
import { Field, FormError } from '../ui/Field';
import { validate } from '../ui/form';
import { JobSelect, Money, Notice, Pager, params, useReloadingList, type JobOption } from '../costs/ui';

interface Props {
  jobs: JobOption[];
  suppliers: { id: number; name: string }[];
  rateCard: RateCardRow[] | null;
  initial: { items: Rental[]; total: number; costCents?: number };
  seesMoney: boolean;
  today: string;
  presetJobId: number | null;
}

const PAGE = 50;
const money = (v: string) => { const p = parseMoney(v); return p.ok && p.value ? toCents(p.value) : null; };
const fromCents = (c: number | null | undefined) => (c === null || c === undefined ? '' : (c / 100).toFixed(2));

function duration(hours: number): string {
  const d = Math.floor(hours / 24);
  const h = Math.round((hours - d * 24) * 10) / 10;
  return [d ? `${d} day${d === 1 ? '' : 's'}` : '', h ? `${h} h` : ''].filter(Boolean).join(' ') || '0 h';
}

/** Equipment on a job: pick-up and return, priced at the cheapest mix of half days, days and weeks. */
export default function RentalsScreen({ jobs, suppliers, rateCard, initial, seesMoney, today, presetJobId }: Props) {
  const card = (kind: EquipmentKind) => rateCard?.find((r) => r.kind === kind);
  const blank = (kind: EquipmentKind = 'earth_auger') => ({
    id: null as number | null,
    jobId: (presetJobId ?? jobs[0]?.id ?? '') as number | '',
    kind,
    description: '',
    supplierId: '' as number | '',
    startAt: `${today}T07:00`,
    endAt: `${today}T17:00`,
    halfDayCents: fromCents(card(kind)?.halfDayCents),
    dayCents: fromCents(card(kind)?.dayCents),
    weekCents: fromCents(card(kind)?.weekCents),
    deliveryCents: '',
    fuelCents: '',
    notes: '',
  });
  const [v, setV] = useState(blank());
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [filterJob, setFilterJob] = useState<number | ''>(presetJobId ?? '');
  const [page, setPage] = useState(1);
  const [tick, setTick] = useState(0);

  const [list] = useReloadingList(initial, `/api/rentals?${params({ job: filterJob, page, pageSize: PAGE })}`, tick);

  const hours = rentalHours(v.startAt, v.endAt);
  const preview = seesMoney
    ? rentalCost({ startAt: v.startAt, endAt: v.endAt, rates: { halfDayCents: money(v.halfDayCents), dayCents: money(v.dayCents), weekCents: money(v.weekCents) }, deliveryCents: money(v.deliveryCents) ?? 0, fuelCents: money(v.fuelCents) ?? 0 })
    : null;

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null); setNotice(null);
    const body = seesMoney ? { ...v, id: undefined } : { jobId: v.jobId, kind: v.kind, description: v.description, startAt: v.startAt, endAt: v.endAt, notes: v.notes };
    const { id: _id, ...payload } = body as typeof v;
    const checked = validate(rentalInput, payload);
    if (!checked.ok) { setFields(checked.fields); setError('Some fields need attention.'); return; }
    setFields({});
    const r = v.id ? await api<Rental>(`/api/rentals/${v.id}`, { method: 'PUT', body: checked.data }) : await api<Rental>('/api/rentals', { body: checked.data });
    if (!r.ok) { setFields(r.error.fields ?? {}); setError(r.error.message); return; }
    setNotice(`${v.id ? 'Updated' : 'Logged'}: ${EQUIPMENT_LABELS[r.data.kind]} on ${r.data.jobCode}, ${duration(r.data.hours)}.`);
    setV(blank(v.kind));
    setTick((t) => t + 1);
  }

  function edit(r: Rental) {
    setV({
      id: r.id, jobId: r.jobId, kind: r.kind, description: r.description ?? '', supplierId: r.supplierId ?? '', startAt: r.startAt, endAt: r.endAt,
      halfDayCents: fromCents(r.halfDayCents ?? card(r.kind)?.halfDayCents), dayCents: fromCents(r.dayCents ?? card(r.kind)?.dayCents), weekCents: fromCents(r.weekCents ?? card(r.kind)?.weekCents),
      deliveryCents: fromCents(r.deliveryCents || null), fuelCents: fromCents(r.fuelCents || null), notes: r.notes ?? '',
    });
    window.scrollTo({ top: 0, behavior: 'smooth' });
  }

  async function remove(r: Rental) {
    if (!window.confirm(`Delete the ${EQUIPMENT_LABELS[r.kind].toLowerCase()} on ${r.jobCode}?`)) return;
    const res = await api(`/api/rentals/${r.id}`, { method: 'DELETE' });
    if (!res.ok) setError(res.error.message);
    setTick((t) => t + 1);
  }

  const rate = (k: 'halfDayCents' | 'dayCents' | 'weekCents' | 'deliveryCents' | 'fuelCents', label: string) => (
    <Field id={`r-${k}`} label={label} error={fields[k]}>{(p) => <input {...p} inputMode="decimal" value={v[k]} onChange={(e) => setV({ ...v, [k]: e.target.value })} />}</Field>
  );

  return (
    <div className="space-y-6">
      <form onSubmit={submit} noValidate className="card space-y-3" aria-label="Log a rental">
        <h2>{v.id ? 'Change the rental' : 'Log a rental'}</h2>
        <FormError message={error} />
        {notice && <Notice>{notice}</Notice>}
        <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          <Field id="r-job" label="Job" error={fields.jobId}>{(p) => <JobSelect jobs={jobs} id={p.id} value={v.jobId} onChange={(jobId) => setV({ ...v, jobId })} className={p.className} />}</Field>
          <Field id="r-kind" label="Equipment" error={fields.kind}>{(p) => (
            <select {...p} value={v.kind} onChange={(e) => { const kind = e.target.value as EquipmentKind; setV({ ...v, kind, halfDayCents: fromCents(card(kind)?.halfDayCents), dayCents: fromCents(card(kind)?.dayCents), weekCents: fromCents(card(kind)?.weekCents) }); }}>
              {EQUIPMENT_KINDS.map((k) => <option key={k} value={k}>{EQUIPMENT_LABELS[k]}</option>)}
            </select>
          )}</Field>
          <Field id="r-description" label="Details (optional)" error={fields.description}>{(p) => <input {...p} value={v.description} placeholder="10 in bit, two-man" onChange={(e) => setV({ ...v, description: e.target.value })} />}</Field>
          <Field id="r-start" label="Picked up" error={fields.startAt}>{(p) => <input {...p} type="datetime-local" value={v.startAt} onChange={(e) => setV({ ...v, startAt: e.target.value })} />}</Field>
          <Field id="r-end" label="Returned" error={fields.endAt}>{(p) => <input {...p} type="datetime-local" value={v.endAt} onChange={(e) => setV({ ...v, endAt: e.target.value })} />}</Field>
          {seesMoney && <Field id="r-supplier" label="Rented from" error={fields.supplierId}>{(p) => (
            <select {...p} value={v.supplierId} onChange={(e) => setV({ ...v, supplierId: e.target.value ? Number(e.target.value) : '' })}>
              <option value="">—</option>
              {suppliers.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
            </select>
          )}</Field>}
        </div>
        {seesMoney && (
          <div className="grid gap-3 sm:grid-cols-5">
            {rate('halfDayCents', 'Half day (4 h)')}
            {rate('dayCents', 'Day (24 h)')}
            {rate('weekCents', 'Week')}
            {rate('deliveryCents', 'Delivery')}
            {rate('fuelCents', 'Fuel')}
          </div>
        )}
        <p className="text-sm text-galv-700" role="status">
          {hours !== null && hours > 0 ? `${duration(hours)} on rent` : 'Give the pick-up and return.'}
          {preview && preview.ok && <> · cheapest: {describePlan(preview.plan)} = <strong><Money cents={preview.totalCents} /></strong></>}
          {preview && !preview.ok && hours !== null && hours > 0 && <> · {preview.reason}</>}
          {!seesMoney && ' · priced by the office from the company’s rate card'}
        </p>
        <div className="flex gap-2">
          <button type="submit" className="btn-primary">{v.id ? 'Save the rental' : 'Log the rental'}</button>
          {v.id && <button type="button" className="btn-secondary" onClick={() => setV(blank())}>Cancel</button>}
        </div>
      </form>

      <section aria-labelledby="rented" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="rented">Rentals</h2>
          <label><span className="label">Job</span><JobSelect jobs={jobs} value={filterJob} onChange={(j) => { setFilterJob(j); setPage(1); }} empty="All jobs" /></label>
        </div>
        {seesMoney && list.costCents !== undefined && <p className="text-sm">{list.total} rental{list.total === 1 ? '' : 's'} · <Money cents={list.costCents} /></p>}
        <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
          <table className="table-dense">
            <thead><tr><th>Job</th><th>Equipment</th><th>Picked up</th><th>Returned</th><th>Time</th>{seesMoney && <><th>Charged as</th><th className="num">Cost</th></>}<th /></tr></thead>
            <tbody>
              {list.items.map((r) => (
                <tr key={r.id}>
                  <td className="whitespace-nowrap">{r.jobCode}</td>
                  <td>{EQUIPMENT_LABELS[r.kind]}{r.description && <span className="block text-xs text-galv-500">{r.description}</span>}</td>
                  <td className="whitespace-nowrap">{r.startAt.replace('T', ' ')}</td>
                  <td className="whitespace-nowrap">{r.endAt.replace('T', ' ')}</td>
                  <td className="whitespace-nowrap">{duration(r.hours)}</td>
                  {seesMoney && <><td className="text-xs">{r.plan ? `${describePlan(r.plan)}${r.deliveryCents ? ' + delivery' : ''}${r.fuelCents ? ' + fuel' : ''}` : <span className="pill bg-timber-100 text-timber-800">Needs rates</span>}</td><td className="num">{r.costCents === null ? '—' : <Money cents={r.costCents} />}</td></>}
                  <td className="whitespace-nowrap text-xs"><button type="button" className="underline" onClick={() => edit(r)}>{seesMoney && r.costCents === null ? 'Price it' : 'Change'}</button> <button type="button" className="ml-2 underline" onClick={() => remove(r)}>Delete</button></td>
                </tr>
              ))}
              {list.items.length === 0 && <tr><td colSpan={8} className="py-6 text-center text-galv-500">No rentals logged.</td></tr>}
            </tbody>
          </table>
        </div>
        <Pager page={page} pageSize={PAGE} total={list.total} noun={['rental', 'rentals']} onPage={setPage} />
      </section>
    </div>
  );
}
