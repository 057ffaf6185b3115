import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import type { ChangeOrderInput } from '../../lib/billing/schema.ts';
import * as repo from '../repos/change-orders.ts';
import { audit } from '../repos/audit.ts';

export { jobContract } from '../repos/change-orders.ts';

export async function listChangeOrders(actor: Actor, jobId: number) {
  if (!(await db()('jobs').where({ organization_id: actor.companyId, id: jobId }).first('id'))) throw notFound('That job');
  return repo.listChangeOrders(actor.companyId, jobId);
}

export async function createChangeOrder(actor: Actor, input: ChangeOrderInput) {
  const id = await db().transaction(async (trx) => {
    if (!(await trx('jobs').where({ organization_id: actor.companyId, id: input.jobId }).first('id'))) throw new AppError('BAD_INPUT', 'Some fields need attention.', { jobId: 'Choose a job of this company.' });
    const newId = await repo.insertChangeOrder(actor.companyId, { jobId: input.jobId, description: input.description, priceCents: input.priceCents, costs: input.costs as Record<string, number>, createdBy: actor.userId }, trx);
    await audit(trx, actor, 'change_order', newId, 'create', { jobId: input.jobId, priceCents: input.priceCents });
    return newId;
  });
  return (await repo.findChangeOrder(actor.companyId, id))!;
}

/**
 * Records the customer's answer. An approval adds the price to the contract (read through
 * jobContract) and writes the estimated cost to job_estimates as source 'change_order'.
 */
export async function decideChangeOrder(actor: Actor, id: number, d: { decision: 'approved' | 'declined'; decidedOn: string; approvedByName: string | null }) {
  await db().transaction(async (trx) => {
    const co = await repo.findChangeOrder(actor.companyId, id, trx, true);
    if (!co) throw notFound('That change order');
    if (co.status !== 'proposed') throw new AppError('CONFLICT', `${co.label} was ${co.status} already.`);
    await repo.decideChangeOrder(actor.companyId, id, { status: d.decision, decidedOn: d.decidedOn, approvedByName: d.approvedByName }, trx);
    if (d.decision === 'approved') await repo.writeChangeOrderEstimate(actor.companyId, co, trx);
    await audit(trx, actor, 'change_order', id, d.decision, { on: d.decidedOn, by: d.approvedByName });
  });
  return (await repo.findChangeOrder(actor.companyId, id))!;
}
