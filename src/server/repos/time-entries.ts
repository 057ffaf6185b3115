import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { TimeEntry, TimeListQuery } from '../../lib/labour/schema.ts';
import type { TimeTask } from '../../lib/labour/tasks.ts';

type Q = Knex | Knex.Transaction;

export interface TimeScope {
  /** A crew lead sees only entries on the jobs assigned to them. */
  crewLeadUserId?: string;
}

export interface NewTimeEntry {
  jobId: number;
  workerId: number;
  date: string;
  /** hours */
  hours: number;
  task: TimeTask;
  notes: string | null;
  wageCents: number;
  burdenPct: number;
  costCents: number;
  enteredBy: string | null;
  importLineId?: number | null;
}

function fromRow(r: Record<string, unknown>): TimeEntry {
  return {
    id: Number(r.id),
    jobId: Number(r.job_id),
    jobCode: r.job_code as string,
    workerId: Number(r.worker_id),
    workerName: r.worker_name as string,
    date: r.work_date as string,
    hours: Number(r.hours),
    task: r.task as TimeTask,
    notes: (r.notes as string) ?? null,
    wageCents: toInt(r.wage_cents),
    costCents: toInt(r.cost_cents),
  };
}

function base(q: Q, companyId: string, scope: TimeScope) {
  const b = q('time_entries as t')
    .join('jobs as j', function () { this.on('j.id', 't.job_id').andOn('j.organization_id', 't.organization_id'); })
    .join('workers as w', function () { this.on('w.id', 't.worker_id').andOn('w.organization_id', 't.organization_id'); })
    .where('t.organization_id', companyId);
  if (scope.crewLeadUserId) b.andWhere('j.crew_lead_user_id', scope.crewLeadUserId);
  return b;
}

const FIELDS = ['t.*', 'j.code as job_code', 'w.name as worker_name'];

export async function listTimeEntries(companyId: string, query: TimeListQuery, scope: TimeScope = {}, q: Q = db()) {
  const b = base(q, companyId, scope);
  if (query.job.length) b.whereIn('t.job_id', query.job);
  if (query.worker.length) b.whereIn('t.worker_id', query.worker);
  if (query.task.length) b.whereIn('t.task', query.task);
  if (query.from) b.andWhere('t.work_date', '>=', query.from);
  if (query.to) b.andWhere('t.work_date', '<=', query.to);
  const [agg] = await b.clone().select(q.raw('COUNT(*) AS n, COALESCE(SUM(t.hours), 0) AS hours, COALESCE(SUM(t.cost_cents), 0) AS cost'));
  const rows = await b
    .clone()
    .select(FIELDS)
    .orderBy([{ column: 't.work_date', order: 'desc' }, { column: 't.id', order: 'desc' }])
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
  return { items: rows.map(fromRow), total: Number(agg.n), hours: Number(agg.hours), costCents: toInt(agg.cost) };
}

export async function findTimeEntry(companyId: string, id: number, scope: TimeScope = {}, q: Q = db()): Promise<TimeEntry | undefined> {
  const r = await base(q, companyId, scope).andWhere('t.id', id).first(FIELDS);
  return r ? fromRow(r) : undefined;
}

function toRow(companyId: string, e: NewTimeEntry) {
  return {
    organization_id: companyId,
    job_id: e.jobId,
    worker_id: e.workerId,
    work_date: e.date,
    hours: e.hours,
    task: e.task,
    notes: e.notes,
    wage_cents: e.wageCents,
    burden_pct: e.burdenPct,
    cost_cents: e.costCents,
    entered_by: e.enteredBy,
    import_line_id: e.importLineId ?? null,
  };
}

export async function insertTimeEntry(companyId: string, entry: NewTimeEntry, q: Q): Promise<number> {
  const [id] = await q('time_entries').insert(toRow(companyId, entry));
  return Number(id);
}

export async function insertTimeEntries(companyId: string, entries: NewTimeEntry[], q: Q): Promise<void> {
  for (let i = 0; i < entries.length; i += 1000) await q('time_entries').insert(entries.slice(i, i + 1000).map((e) => toRow(companyId, e)));
}

export async function updateTimeEntry(companyId: string, id: number, row: Record<string, unknown>, q: Q): Promise<void> {
  await q('time_entries').where({ organization_id: companyId, id }).update({ ...row, updated_at: q.fn.now(3) });
}

export async function deleteTimeEntry(companyId: string, id: number, q: Q = db()): Promise<boolean> {
  return (await q('time_entries').where({ organization_id: companyId, id }).delete()) > 0;
}

export async function timeEntryRaw(companyId: string, id: number, q: Q) {
  return q('time_entries').where({ organization_id: companyId, id }).first();
}

/** Hours by task on one job: what calibration compares with the bid. */
export async function hoursByTask(companyId: string, jobId: number, q: Q = db()): Promise<{ task: TimeTask; hours: number }[]> {
  const rows = (await q('time_entries').where({ organization_id: companyId, job_id: jobId }).groupBy('task').select('task', q.raw('SUM(hours) AS hours'))) as { task: TimeTask; hours: string }[];
  return rows.map((r) => ({ task: r.task, hours: Number(r.hours) }));
}
