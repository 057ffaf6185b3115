import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { Job, JobInput, JobListQuery, JobRow } from '../../lib/jobs/schema.ts';

type Q = Knex | Knex.Transaction;

const COLUMNS: Record<keyof JobInput, string> = {
  code: 'code',
  title: 'title',
  customerId: 'customer_id',
  fenceStyleId: 'fence_style_id',
  status: 'status',
  commercial: 'commercial',
  estimatorUserId: 'estimator_user_id',
  crewLeadUserId: 'crew_lead_user_id',
  siteLine1: 'site_line1',
  siteCity: 'site_city',
  siteRegion: 'site_region',
  sitePostal: 'site_postal',
  leadDate: 'lead_date',
  measureDate: 'measure_date',
  bidDate: 'bid_date',
  decidedDate: 'decided_date',
  startDate: 'start_date',
  completedDate: 'completed_date',
  closedDate: 'closed_date',
  notes: 'notes',
};

const SORT_COLUMNS: Record<JobListQuery['sort'], string> = {
  code: 'j.code',
  title: 'j.title',
  customer: 'c.name',
  style: 's.name',
  status: 'j.status',
  leadDate: 'j.lead_date',
  updatedAt: 'j.updated_at',
  contract: 'j.contract_cents',
};

export interface JobScope {
  /** A crew lead sees only the jobs assigned to them. */
  crewLeadUserId?: string;
}

function toRow(input: Partial<JobInput>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, col] of Object.entries(COLUMNS)) {
    if (key in input) row[col] = (input as Record<string, unknown>)[key];
  }
  return row;
}

function iso(v: unknown): string {
  return v ? new Date(v as string).toISOString() : '';
}

function fromRow(r: Record<string, unknown>): Job {
  return {
    id: Number(r.id),
    code: r.code as string,
    title: r.title as string,
    status: r.status as Job['status'],
    customerId: Number(r.customer_id),
    customerName: (r.customer_name as string) ?? '',
    fenceStyleId: r.fence_style_id == null ? null : Number(r.fence_style_id),
    styleName: (r.style_name as string) ?? null,
    estimatorUserId: (r.estimator_user_id as string) ?? null,
    estimatorName: (r.estimator_name as string) ?? null,
    crewLeadUserId: (r.crew_lead_user_id as string) ?? null,
    crewLeadName: (r.crew_lead_name as string) ?? null,
    commercial: Boolean(r.commercial),
    siteLine1: (r.site_line1 as string) ?? null,
    siteCity: (r.site_city as string) ?? null,
    siteRegion: (r.site_region as string) ?? null,
    sitePostal: (r.site_postal as string) ?? null,
    leadDate: (r.lead_date as string) ?? null,
    measureDate: (r.measure_date as string) ?? null,
    bidDate: (r.bid_date as string) ?? null,
    decidedDate: (r.decided_date as string) ?? null,
    startDate: (r.start_date as string) ?? null,
    completedDate: (r.completed_date as string) ?? null,
    closedDate: (r.closed_date as string) ?? null,
    contractCents: r.contract_cents == null ? null : Number(r.contract_cents),
    notes: (r.notes as string) ?? null,
    createdAt: iso(r.created_at),
    updatedAt: iso(r.updated_at),
  };
}

function selectJobs(q: Q, companyId: string, scope: JobScope) {
  const b = q('jobs as j')
    .join('customers as c', function () {
      this.on('c.id', 'j.customer_id').andOn('c.organization_id', 'j.organization_id');
    })
    .leftJoin('fence_styles as s', function () {
      this.on('s.id', 'j.fence_style_id').andOn('s.organization_id', 'j.organization_id');
    })
    .leftJoin('user as ue', 'ue.id', 'j.estimator_user_id')
    .leftJoin('user as uc', 'uc.id', 'j.crew_lead_user_id')
    .where('j.organization_id', companyId);
  if (scope.crewLeadUserId) b.andWhere('j.crew_lead_user_id', scope.crewLeadUserId);
  return b;
}

const LIST_FIELDS = ['j.*', 'c.name as customer_name', 's.name as style_name', 'ue.name as estimator_name', 'uc.name as crew_lead_name'];

/**
 * The ids of the jobs a list asks for, all of them, in its order. The filter and the order run
 * on jobs alone where they can (a join only for a name searched or sorted on); the service
 * keeps the result in the report cache and takes pages from it.
 */
export async function jobIdsInOrder(companyId: string, query: Omit<JobListQuery, 'page' | 'pageSize'>, scope: JobScope = {}, q: Q = db()): Promise<number[]> {
  const b = q('jobs as j').where('j.organization_id', companyId);
  if (scope.crewLeadUserId) b.andWhere('j.crew_lead_user_id', scope.crewLeadUserId);
  if (query.status.length) b.whereIn('j.status', query.status);
  if (query.style.length) b.whereIn('j.fence_style_id', query.style);
  if (query.customer) b.andWhere('j.customer_id', query.customer);
  if (query.q || query.sort === 'customer') {
    b.join('customers as c', function () {
      this.on('c.id', 'j.customer_id').andOn('c.organization_id', 'j.organization_id');
    });
  }
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    b.andWhere((w) =>
      w.whereILike('j.code', like).orWhereILike('j.title', like).orWhereILike('c.name', like).orWhereILike('j.site_line1', like).orWhereILike('j.site_city', like),
    );
  }
  if (query.sort === 'style') {
    b.leftJoin('fence_styles as s', function () {
      this.on('s.id', 'j.fence_style_id').andOn('s.organization_id', 'j.organization_id');
    });
  }
  b.select('j.id').orderBy(SORT_COLUMNS[query.sort], query.dir);
  // A job code is unique in its company, so it needs no tie-break; other columns are broken by id.
  if (query.sort !== 'code') b.orderBy('j.id', query.dir);
  return (await b).map((r: { id: number }) => Number(r.id));
}

/** These jobs, with their names, in the order given (ids no longer there are left out). */
export async function jobsByIds(companyId: string, ids: number[], scope: JobScope = {}, q: Q = db()): Promise<JobRow[]> {
  if (!ids.length) return [];
  const rows = await selectJobs(q, companyId, scope).whereIn('j.id', ids).select(LIST_FIELDS);
  const byId = new Map(rows.map((r: Record<string, unknown>) => [Number(r.id), r]));
  return ids.flatMap((id) => (byId.has(id) ? [fromRow(byId.get(id)!)] : []));
}

export async function findJob(companyId: string, id: number, scope: JobScope = {}, q: Q = db()): Promise<Job | undefined> {
  const r = await selectJobs(q, companyId, scope).andWhere('j.id', id).first(LIST_FIELDS);
  return r ? fromRow(r) : undefined;
}

export async function insertJob(companyId: string, input: JobInput & { code: string }, createdBy: string, q: Q): Promise<number> {
  const [id] = await q('jobs').insert({ organization_id: companyId, ...toRow(input), created_by: createdBy });
  return Number(id);
}

export async function updateJob(companyId: string, id: number, input: Partial<JobInput>, q: Q = db()): Promise<boolean> {
  const row = toRow(input);
  const n = await q('jobs').where({ organization_id: companyId, id }).update({ ...row, updated_at: q.fn.now(3) });
  return n > 0;
}

export async function codeTaken(companyId: string, code: string, exceptId: number | null, q: Q = db()): Promise<boolean> {
  const b = q('jobs').where({ organization_id: companyId, code });
  if (exceptId) b.whereNot('id', exceptId);
  return Boolean(await b.first('id'));
}

/** Takes the next job number under a row lock, so two creates never get the same code. */
export async function nextJobNumber(companyId: string, trx: Knex.Transaction): Promise<number> {
  const row = await trx('company_settings').where('organization_id', companyId).forUpdate().first('next_job_number');
  const n = Number(row?.next_job_number ?? 1);
  await trx('company_settings').where('organization_id', companyId).update({ next_job_number: n + 1 });
  return n;
}

export async function deleteJob(companyId: string, id: number, q: Q = db()): Promise<boolean> {
  return (await q('jobs').where({ organization_id: companyId, id }).delete()) > 0;
}
