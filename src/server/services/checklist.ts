import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError } from '../../lib/errors.ts';
import { buildingGate, locateDates, locateStatus, LOCATE_STATUS_LABELS, permitNeeded, type ChecklistInput } from '../../lib/checklist/checklist.ts';
import * as repo from '../repos/checklist.ts';
import { audit } from '../repos/audit.ts';
import { companyRules, companyToday } from './bids.ts';
import { getJob } from './jobs.ts';

/** The job's pre-dig checklist with its dates counted by the company's rules. */
export async function checklistFor(companyId: string, jobId: number) {
  const [row, { locate, site }, today, runs] = await Promise.all([repo.findChecklist(companyId, jobId), companyRules(companyId), companyToday(companyId), repo.bidRuns(companyId, jobId)]);
  const ls = locateStatus(row.locateTicketNumber, row.locateCalledOn, today, locate);
  return {
    jobId, today, ...row,
    locate: { ...ls, label: LOCATE_STATUS_LABELS[ls.status] },
    permitSuggestion: permitNeeded(runs, site.permitMaxHeightIn),
    gate: buildingGate(ls.status, row.overrideReason),
    rules: { waitBusinessDays: locate.waitBusinessDays, validDays: locate.validDays, validBasis: locate.validBasis },
  };
}

export async function getChecklist(actor: Actor, jobId: number) {
  await getJob(actor, jobId);
  return checklistFor(actor.companyId, jobId);
}

export async function updateChecklist(actor: Actor, jobId: number, input: Partial<ChecklistInput>) {
  await getJob(actor, jobId);
  const { locate } = await companyRules(actor.companyId);
  const current = await repo.findChecklist(actor.companyId, jobId);
  const calledOn = input.locateCalledOn !== undefined ? input.locateCalledOn : current.locateCalledOn;
  const dates = calledOn ? locateDates(calledOn, locate) : { digFrom: null, expiresOn: null };
  await db().transaction(async (trx) => {
    await repo.saveChecklist(actor.companyId, jobId, input, { locate_dig_from: dates.digFrom, locate_expires_on: dates.expiresOn }, actor.userId, trx);
    await audit(trx, actor, 'checklist', jobId, 'update', { fields: Object.keys(input) });
  });
  return checklistFor(actor.companyId, jobId);
}

/** The owner's written reason to let a job build without a current locate ticket. */
export async function overrideGate(actor: Actor, jobId: number, reason: string) {
  await getJob(actor, jobId);
  await db().transaction(async (trx) => {
    await repo.saveChecklist(actor.companyId, jobId, {}, { override_reason: reason, override_by: actor.userId, override_at: trx.fn.now(3) }, actor.userId, trx);
    await audit(trx, actor, 'checklist', jobId, 'override', { reason });
  });
  return checklistFor(actor.companyId, jobId);
}

export async function clearOverride(actor: Actor, jobId: number) {
  await getJob(actor, jobId);
  await db().transaction(async (trx) => {
    await repo.saveChecklist(actor.companyId, jobId, {}, { override_reason: null, override_by: null, override_at: null }, actor.userId, trx);
    await audit(trx, actor, 'checklist', jobId, 'override_cleared');
  });
  return checklistFor(actor.companyId, jobId);
}

/** The stage gate the jobs service calls before a job moves to building. */
export async function assertCanBuild(companyId: string, jobId: number): Promise<void> {
  const c = await checklistFor(companyId, jobId);
  if (!c.gate.ok) throw new AppError('LOCATE_REQUIRED', c.gate.message, { status: c.gate.message });
}
