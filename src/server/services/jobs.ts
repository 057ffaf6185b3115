import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { cachedReport, filterKey } from '../report-cache.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { can } from '../../lib/auth/permissions.ts';
import { formatJobCode, type Job, type JobInput, type JobListQuery, type JobRow } from '../../lib/jobs/schema.ts';
import * as jobs from '../repos/jobs.ts';
import { findCustomer } from '../repos/customers.ts';
import { styleExists } from '../repos/styles.ts';
import { isMemberWithRole } from '../repos/members.ts';
import { audit } from '../repos/audit.ts';
import { assertCanBuild } from './checklist.ts';

/** A crew lead sees only the jobs assigned to them. */
export function scopeFor(actor: Actor): jobs.JobScope {
  return actor.role === 'crew_lead' ? { crewLeadUserId: actor.userId } : {};
}

/** Prices are not for every role: a crew lead never sees the contract. */
function redact<T extends JobRow>(actor: Actor, job: T): T {
  return can(actor.role, 'bids:read') ? job : { ...job, contractCents: null };
}

/**
 * One page of the jobs table. The order of every job the filter matches is kept in the report
 * cache while the company's data is unchanged (a new job, an edit or a new customer name raises
 * its version), so paging and re-sorting read only the page's rows.
 */
export async function listJobs(actor: Actor, query: JobListQuery): Promise<{ items: JobRow[]; total: number; page: number; pageSize: number }> {
  const scope = scopeFor(actor);
  const { page, pageSize, ...order } = query;
  const ids = await cachedReport(actor.companyId, filterKey('job-order', { ...order, crewLead: scope.crewLeadUserId }), () => jobs.jobIdsInOrder(actor.companyId, order, scope), { version: actor.dataVersion });
  const items = await jobs.jobsByIds(actor.companyId, ids.slice((page - 1) * pageSize, page * pageSize), scope);
  return { items: items.map((j) => redact(actor, j)), total: ids.length, page, pageSize };
}

export async function getJob(actor: Actor, id: number): Promise<Job> {
  const job = await jobs.findJob(actor.companyId, id, scopeFor(actor));
  if (!job) throw notFound('That job');
  return redact(actor, job);
}

async function checkReferences(actor: Actor, input: Partial<JobInput>): Promise<void> {
  const fields: Record<string, string> = {};
  if (input.customerId != null && !(await findCustomer(actor.companyId, input.customerId))) fields.customerId = 'Choose a customer of this company.';
  if (input.fenceStyleId != null && !(await styleExists(actor.companyId, input.fenceStyleId))) fields.fenceStyleId = 'Choose a fence style of this company.';
  if (input.estimatorUserId && !(await isMemberWithRole(actor.companyId, input.estimatorUserId, ['estimator', 'owner']))) fields.estimatorUserId = 'Choose an estimator of this company.';
  if (input.crewLeadUserId && !(await isMemberWithRole(actor.companyId, input.crewLeadUserId, ['crew_lead', 'owner']))) fields.crewLeadUserId = 'Choose a crew lead of this company.';
  if (Object.keys(fields).length) throw new AppError('BAD_INPUT', 'Some fields need attention.', fields);
}

function duplicateCode(code: string): AppError {
  return new AppError('DUPLICATE_JOB_CODE', `Job code ${code} is already used in this company. Pick another or leave it empty for the next number.`, {
    code: `${code} is already used.`,
  });
}

export async function createJob(actor: Actor, input: JobInput): Promise<Job> {
  await checkReferences(actor, input);
  const id = await db().transaction(async (trx) => {
    let code = input.code;
    if (!code) {
      // Skip numbers someone typed by hand, so the counter never collides with them.
      do code = formatJobCode(await jobs.nextJobNumber(actor.companyId, trx));
      while (await jobs.codeTaken(actor.companyId, code, null, trx));
    } else if (await jobs.codeTaken(actor.companyId, code, null, trx)) {
      throw duplicateCode(code);
    }
    try {
      const newId = await jobs.insertJob(actor.companyId, { ...input, code }, actor.userId, trx);
      await audit(trx, actor, 'job', newId, 'create', { code });
      return newId;
    } catch (err) {
      if ((err as { code?: string }).code === 'ER_DUP_ENTRY') throw duplicateCode(code);
      throw err;
    }
  });
  return getJob(actor, id);
}

export async function updateJob(actor: Actor, id: number, input: Partial<JobInput>): Promise<Job> {
  const current = await getJob(actor, id);
  // The stage gate: no building without a current locate ticket or the owner's written override.
  if (input.status === 'building' && current.status !== 'building') await assertCanBuild(actor.companyId, id);
  await checkReferences(actor, input);
  if (input.code && (await jobs.codeTaken(actor.companyId, input.code, id))) throw duplicateCode(input.code);
  try {
    await db().transaction(async (trx) => {
      await jobs.updateJob(actor.companyId, id, input, trx);
      await audit(trx, actor, 'job', id, 'update', { fields: Object.keys(input) });
    });
  } catch (err) {
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY' && input.code) throw duplicateCode(input.code);
    throw err;
  }
  return getJob(actor, id);
}
