import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { can } from '../../lib/auth/permissions.ts';
import { labourCostCents } from '../../lib/labour/cost.ts';
import { TIME_TASKS, TIME_TASK_LABELS } from '../../lib/labour/tasks.ts';
import type { TimeEntry, TimeEntryInput, TimeEntryPatch, TimeListQuery, TimeOptions } from '../../lib/labour/schema.ts';
import type { JobStatus } from '../../lib/jobs/schema.ts';
import * as time from '../repos/time-entries.ts';
import { findJob } from '../repos/jobs.ts';
import { workerOptions, workersByIds } from '../repos/workers.ts';
import { getSettings } from '../repos/settings.ts';
import { audit } from '../repos/audit.ts';
import { scopeFor } from './jobs.ts';

/** Jobs that take crew hours and rentals: won and on through completion. */
export const WORKING_STATUSES: JobStatus[] = ['won', 'building', 'completed', 'closed'];

/** Wages and costs are for those who may read all time; a crew lead gets hours only. */
export function seesMoney(actor: Actor): boolean {
  return can(actor.role, 'time:read_all');
}

function redact(actor: Actor, e: TimeEntry): TimeEntry {
  if (seesMoney(actor)) return e;
  const { wageCents: _w, costCents: _c, ...rest } = e;
  return rest;
}

export async function listTime(actor: Actor, query: TimeListQuery) {
  const r = await time.listTimeEntries(actor.companyId, query, scopeFor(actor));
  const money = seesMoney(actor);
  return { items: r.items.map((e) => redact(actor, e)), total: r.total, hours: r.hours, ...(money ? { costCents: r.costCents } : {}) };
}

/** The job, if this actor may log on it; a crew lead's other jobs are 404 like another company's. */
export async function workingJob(actor: Actor, jobId: number) {
  const job = await findJob(actor.companyId, jobId, scopeFor(actor));
  if (!job) throw new AppError('NOT_FOUND', 'That job was not found.', { jobId: 'Choose one of your jobs.' });
  if (!WORKING_STATUSES.includes(job.status)) throw new AppError('RULE_BROKEN', `${job.code} is not a won job yet; hours and rentals go on won jobs.`, { jobId: 'Choose a won job.' });
  return job;
}

async function checkWorkers(actor: Actor, ids: number[]) {
  const found = await workersByIds(actor.companyId, ids);
  const fields: Record<string, string> = {};
  ids.forEach((id, i) => {
    const w = found.get(id);
    if (!w) fields[`workers.${i}.workerId`] = 'Choose a worker of this company.';
    else if (!w.active) fields[`workers.${i}.workerId`] = `${w.name} is no longer active.`;
  });
  if (Object.keys(fields).length) throw new AppError('BAD_INPUT', 'Some workers need attention.', fields);
  return found;
}

export async function logTime(actor: Actor, input: TimeEntryInput): Promise<TimeEntry[]> {
  await workingJob(actor, input.jobId);
  const workers = await checkWorkers(actor, input.workers.map((w) => w.workerId));
  const burdenPct = Number((await getSettings(actor.companyId)).labourBurdenPct);
  const ids = await db().transaction(async (trx) => {
    const made: number[] = [];
    for (const w of input.workers) {
      const wageCents = workers.get(w.workerId)!.wageCents;
      made.push(await time.insertTimeEntry(actor.companyId, { jobId: input.jobId, workerId: w.workerId, date: input.date, hours: w.hours, task: input.task, notes: input.notes, wageCents, burdenPct, costCents: labourCostCents({ hours: w.hours, wageCents, burdenPct }), enteredBy: actor.userId }, trx));
    }
    await audit(trx, actor, 'job', input.jobId, 'log_time', { date: input.date, task: input.task, entries: made });
    return made;
  });
  const out: TimeEntry[] = [];
  for (const id of ids) out.push(redact(actor, (await time.findTimeEntry(actor.companyId, id, scopeFor(actor)))!));
  return out;
}

async function ownEntry(actor: Actor, id: number): Promise<TimeEntry> {
  const e = await time.findTimeEntry(actor.companyId, id, scopeFor(actor));
  if (!e) throw notFound('That time entry');
  return e;
}

export async function updateTime(actor: Actor, id: number, patch: TimeEntryPatch): Promise<TimeEntry> {
  const entry = await ownEntry(actor, id);
  if (patch.jobId !== undefined && patch.jobId !== entry.jobId) await workingJob(actor, patch.jobId);
  const raw = await time.timeEntryRaw(actor.companyId, id, db());
  let wageCents = Number(raw.wage_cents);
  if (patch.workerId !== undefined && patch.workerId !== entry.workerId) wageCents = (await checkWorkers(actor, [patch.workerId])).get(patch.workerId)!.wageCents;
  const hours = patch.hours ?? Number(raw.hours);
  const row: Record<string, unknown> = {
    ...(patch.jobId !== undefined ? { job_id: patch.jobId } : {}),
    ...(patch.workerId !== undefined ? { worker_id: patch.workerId } : {}),
    ...(patch.date !== undefined ? { work_date: patch.date } : {}),
    ...(patch.task !== undefined ? { task: patch.task } : {}),
    ...('notes' in patch ? { notes: patch.notes } : {}),
    hours,
    wage_cents: wageCents,
    // The burden stays what the entry was first costed with.
    cost_cents: labourCostCents({ hours, wageCents, burdenPct: Number(raw.burden_pct) }),
  };
  await db().transaction(async (trx) => {
    await time.updateTimeEntry(actor.companyId, id, row, trx);
    await audit(trx, actor, 'time_entry', id, 'update', { fields: Object.keys(patch) });
  });
  return redact(actor, await ownEntry(actor, id));
}

export async function deleteTime(actor: Actor, id: number): Promise<void> {
  const entry = await ownEntry(actor, id);
  await db().transaction(async (trx) => {
    await time.deleteTimeEntry(actor.companyId, id, trx);
    await audit(trx, actor, 'time_entry', id, 'delete', { jobId: entry.jobId, hours: entry.hours });
  });
}

/** What the phone form needs: the jobs this person may log on and who can be on the crew. */
export async function timeOptions(actor: Actor): Promise<TimeOptions> {
  const q = db()('jobs').where('organization_id', actor.companyId).whereIn('status', WORKING_STATUSES);
  const scope = scopeFor(actor);
  if (scope.crewLeadUserId) q.andWhere('crew_lead_user_id', scope.crewLeadUserId);
  const jobs = await q.orderByRaw("FIELD(status, 'building', 'won', 'completed', 'closed')").orderBy('code', 'desc').limit(300).select('id', 'code', 'title', 'status');
  return {
    jobs: jobs.map((j) => ({ id: Number(j.id), code: j.code, title: j.title, status: j.status })),
    workers: await workerOptions(actor.companyId, actor.role === 'crew_lead' ? actor.userId : null),
    tasks: TIME_TASKS.map((t) => ({ value: t, label: TIME_TASK_LABELS[t] })),
  };
}

/** Hours by task on a job this actor may see (a crew lead's own jobs only). */
export async function jobHours(actor: Actor, jobId: number) {
  if (!(await findJob(actor.companyId, jobId, scopeFor(actor)))) throw notFound('That job');
  return time.hoursByTask(actor.companyId, jobId);
}
