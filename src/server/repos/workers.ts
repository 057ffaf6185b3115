import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { Worker, WorkerInput, WorkerOption } from '../../lib/labour/schema.ts';

type Q = Knex | Knex.Transaction;

const COLUMNS: Record<keyof WorkerInput, string> = {
  name: 'name',
  wageCents: 'wage_cents',
  crewLeadUserId: 'crew_lead_user_id',
  active: 'active',
  notes: 'notes',
};

function toRow(input: Partial<WorkerInput>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, col] of Object.entries(COLUMNS)) if (key in input) row[col] = (input as Record<string, unknown>)[key];
  return row;
}

function fromRow(r: Record<string, unknown>): Worker {
  return {
    id: Number(r.id),
    name: r.name as string,
    wageCents: toInt(r.wage_cents),
    crewLeadUserId: (r.crew_lead_user_id as string) ?? null,
    crewLeadName: (r.crew_lead_name as string) ?? null,
    active: Boolean(r.active),
    notes: (r.notes as string) ?? null,
    hoursLogged: Number(r.hours_logged ?? 0),
  };
}

export async function listWorkers(companyId: string, q: Q = db()): Promise<Worker[]> {
  const rows = await q('workers as w')
    .leftJoin('user as u', 'u.id', 'w.crew_lead_user_id')
    .where('w.organization_id', companyId)
    .select('w.*', 'u.name as crew_lead_name')
    .select(q.raw('(SELECT COALESCE(SUM(t.hours), 0) FROM time_entries t WHERE t.organization_id = w.organization_id AND t.worker_id = w.id) AS hours_logged'))
    .orderBy([{ column: 'w.active', order: 'desc' }, { column: 'w.name' }]);
  return rows.map(fromRow);
}

export async function findWorker(companyId: string, id: number, q: Q = db()): Promise<Worker | undefined> {
  const r = await q('workers').where({ organization_id: companyId, id }).first();
  return r ? fromRow(r) : undefined;
}

export async function workersByIds(companyId: string, ids: number[], q: Q = db()): Promise<Map<number, Worker>> {
  if (!ids.length) return new Map();
  const rows = await q('workers').where('organization_id', companyId).whereIn('id', ids);
  return new Map(rows.map((r) => [Number(r.id), fromRow(r)]));
}

/** Active workers by lower-cased name, for matching timesheet rows. */
export async function workersByName(companyId: string, q: Q = db()): Promise<Map<string, Worker>> {
  const rows = await q('workers').where({ organization_id: companyId });
  return new Map(rows.map((r) => [String(r.name).trim().toLowerCase(), fromRow(r)]));
}

/** Names for a picker; a crew lead's own crew first. */
export async function workerOptions(companyId: string, crewLeadUserId: string | null, q: Q = db()): Promise<WorkerOption[]> {
  const rows = await q('workers').where({ organization_id: companyId, active: true }).orderBy('name').select('id', 'name', 'crew_lead_user_id');
  const out = rows.map((r) => ({ id: Number(r.id), name: r.name as string, mine: crewLeadUserId !== null && r.crew_lead_user_id === crewLeadUserId }));
  return [...out.filter((w) => w.mine), ...out.filter((w) => !w.mine)];
}

export async function insertWorker(companyId: string, input: WorkerInput, q: Q = db()): Promise<number> {
  const [id] = await q('workers').insert({ organization_id: companyId, ...toRow(input) });
  return Number(id);
}

export async function updateWorker(companyId: string, id: number, input: Partial<WorkerInput>, q: Q = db()): Promise<boolean> {
  const row = toRow(input);
  if (!Object.keys(row).length) return true;
  return (await q('workers').where({ organization_id: companyId, id }).update({ ...row, updated_at: q.fn.now(3) })) > 0;
}
