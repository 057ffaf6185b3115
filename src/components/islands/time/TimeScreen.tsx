import { useState, type SubmitEvent } from 'react';
import { timeEntryInput, type TimeEntry, type TimeOptions } from '../../../lib/labour/schema';
import { TIME_TASK_LABELS, type TimeTask } from '../../../lib/labour/tasks';
import { api } from '../ui/api';
import { FormError } from '../ui/Field';
import { validate } from '../ui/form';
import { Money, Notice, Pager, params, useReloadingList } from '../costs/ui';

interface Props {
  options: TimeOptions;
  initial: { items: TimeEntry[]; total: number; hours: number; costCents?: number };
  seesMoney: boolean;
  today: string;
  presetJobId: number | null;
}

const PAGE = 50;

/** Crew hours from a phone: one job, one day, one task, the hours of each worker on the crew. */
export default function TimeScreen({ options, initial, seesMoney, today, presetJobId }: Props) {
  const [jobId, setJobId] = useState<number | ''>(presetJobId ?? options.jobs[0]?.id ?? '');
  const [date, setDate] = useState(today);
  const [task, setTask] = useState<TimeTask | ''>('');
  const [hours, setHours] = useState<Record<number, string>>({});
  const [notes, setNotes] = useState('');
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [filterJob, setFilterJob] = useState<number | ''>(presetJobId ?? '');
  const [page, setPage] = useState(1);
  const [tick, setTick] = useState(0);

  const [list] = useReloadingList(initial, `/api/time?${params({ job: filterJob, page, pageSize: PAGE })}`, tick);

  const crew = Object.entries(hours).filter(([, h]) => h.trim() !== '');

  async function submit(e: SubmitEvent) {
    e.preventDefault();
    setError(null); setNotice(null);
    const v = validate(timeEntryInput, { jobId, date, task, notes, workers: crew.map(([workerId, h]) => ({ workerId: Number(workerId), hours: h })) });
    if (!v.ok) { setFields(v.fields); setError(Object.values(v.fields)[0] ?? 'Some fields need attention.'); return; }
    setFields({});
    setBusy(true);
    const r = await api<{ items: TimeEntry[] }>('/api/time', { body: v.data });
    setBusy(false);
    if (!r.ok) { setFields(r.error.fields ?? {}); setError(r.error.message); return; }
    const total = v.data.workers.reduce((a, w) => a + w.hours, 0);
    const code = options.jobs.find((j) => j.id === v.data.jobId)?.code;
    setNotice(`Saved ${r.data.items.length} entr${r.data.items.length === 1 ? 'y' : 'ies'}: ${total} h of ${TIME_TASK_LABELS[v.data.task].toLowerCase()} on ${code}.`);
    setHours({});
    setNotes('');
    setTick((t) => t + 1);
  }

  async function remove(entry: TimeEntry) {
    if (!window.confirm(`Delete ${entry.hours} h for ${entry.workerName} on ${entry.date}?`)) return;
    const r = await api(`/api/time/${entry.id}`, { method: 'DELETE' });
    if (!r.ok) setError(r.error.message);
    setTick((t) => t + 1);
  }

  return (
    <div className="space-y-6">
      <form onSubmit={submit} noValidate className="card space-y-4" aria-label="Log crew hours">
        <h2>Log hours</h2>
        <FormError message={error} />
        {notice && <Notice>{notice}</Notice>}
        {options.jobs.length === 0 ? <p className="text-sm text-galv-600">No won jobs are assigned to you yet.</p> : (
          <>
            <div className="grid gap-3 sm:grid-cols-2">
              <label>
                <span className="label">Job</span>
                <select className={`input py-3 text-base ${fields.jobId ? 'input-error' : ''}`} value={jobId} onChange={(e) => setJobId(e.target.value ? Number(e.target.value) : '')}>
                  {options.jobs.map((j) => <option key={j.id} value={j.id}>{j.code} · {j.title}</option>)}
                </select>
                {fields.jobId && <span className="field-error block">{fields.jobId}</span>}
              </label>
              <label>
                <span className="label">Day</span>
                <input className="input py-3 text-base" type="date" value={date} onChange={(e) => setDate(e.target.value)} />
              </label>
            </div>
            <fieldset>
              <legend className="label">Task</legend>
              <div className="grid grid-cols-2 gap-2 sm:grid-cols-5">
                {options.tasks.map((t) => (
                  <label key={t.value} className={`cursor-pointer rounded-md border px-3 py-3 text-center text-sm ${task === t.value ? 'border-timber-600 bg-timber-100 font-semibold text-timber-900' : 'border-galv-300 bg-white'}`}>
                    <input type="radio" name="task" className="sr-only" value={t.value} checked={task === t.value} onChange={() => setTask(t.value as TimeTask)} />
                    {t.label}
                  </label>
                ))}
              </div>
              {fields.task && <span className="field-error block">{fields.task}</span>}
            </fieldset>
            <fieldset>
              <legend className="label">Who worked, and how many hours</legend>
              <ul className="grid gap-2 sm:grid-cols-2">
                {options.workers.map((w) => (
                  <li key={w.id} className="flex items-center gap-2 rounded-md border border-galv-200 bg-white px-3 py-2">
                    <label className="flex flex-1 items-center gap-2 text-sm">
                      <input type="checkbox" className="h-5 w-5" checked={w.id in hours} onChange={(e) => setHours((h) => { const n = { ...h }; if (e.target.checked) n[w.id] = '8'; else delete n[w.id]; return n; })} />
                      {w.name}{w.mine && <span className="text-xs text-galv-500">your crew</span>}
                    </label>
                    {w.id in hours && <input className="input w-20 py-2 text-right text-base" inputMode="decimal" aria-label={`Hours for ${w.name}`} value={hours[w.id]} onChange={(e) => setHours({ ...hours, [w.id]: e.target.value })} />}
                  </li>
                ))}
              </ul>
              {fields.workers && <span className="field-error block">{fields.workers}</span>}
            </fieldset>
            <label className="block">
              <span className="label">Notes (optional)</span>
              <input className="input" value={notes} placeholder="Hit rock at the corner post; hand-dug near the gas mark" onChange={(e) => setNotes(e.target.value)} />
            </label>
            <button type="submit" className="btn-primary w-full py-3 text-base sm:w-auto" disabled={busy}>Save {crew.length ? `${crew.length} ${crew.length === 1 ? 'worker’s' : 'workers’'} hours` : 'hours'}</button>
          </>
        )}
      </form>

      <section aria-labelledby="logged" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="logged">Hours logged</h2>
          <label>
            <span className="label">Job</span>
            <select className="input" value={filterJob} onChange={(e) => { setFilterJob(e.target.value ? Number(e.target.value) : ''); setPage(1); }}>
              <option value="">All {seesMoney ? '' : 'my '}jobs</option>
              {options.jobs.map((j) => <option key={j.id} value={j.id}>{j.code} · {j.title}</option>)}
            </select>
          </label>
        </div>
        <p className="text-sm" data-testid="time-total">{list.total} entr{list.total === 1 ? 'y' : 'ies'} · {list.hours} h{seesMoney && list.costCents !== undefined ? <> · cost <Money cents={list.costCents} /></> : null}</p>
        <ul className="space-y-2 sm:hidden" aria-label="Time entries">
          {list.items.map((t) => (
            <li key={t.id} className="card flex items-center justify-between gap-2 p-3 text-sm">
              <div><p className="font-medium">{t.workerName} · {t.hours} h</p><p className="text-xs text-galv-600">{t.date} · {t.jobCode} · {TIME_TASK_LABELS[t.task]}</p></div>
              <button type="button" className="text-xs underline" onClick={() => remove(t)}>Delete</button>
            </li>
          ))}
        </ul>
        <div className="hidden overflow-x-auto rounded-lg border border-galv-200 bg-white sm:block">
          <table className="table-dense">
            <thead><tr><th>Day</th><th>Job</th><th>Worker</th><th>Task</th><th className="num">Hours</th>{seesMoney && <><th className="num">Wage</th><th className="num">Cost with burden</th></>}<th /></tr></thead>
            <tbody>
              {list.items.map((t) => (
                <tr key={t.id}>
                  <td className="whitespace-nowrap">{t.date}</td><td>{t.jobCode}</td><td>{t.workerName}</td><td>{TIME_TASK_LABELS[t.task]}</td><td className="num">{t.hours}</td>
                  {seesMoney && <><td className="num"><Money cents={t.wageCents} /></td><td className="num"><Money cents={t.costCents} /></td></>}
                  <td><button type="button" className="text-xs underline" onClick={() => remove(t)}>Delete</button></td>
                </tr>
              ))}
              {list.items.length === 0 && <tr><td colSpan={8} className="py-6 text-center text-galv-500">No hours logged yet.</td></tr>}
            </tbody>
          </table>
        </div>
        <Pager page={page} pageSize={PAGE} total={list.total} noun={['entry', 'entries']} onPage={setPage} />
      </section>
    </div>
  );
}
