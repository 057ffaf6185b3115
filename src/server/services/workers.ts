import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import type { Worker, WorkerInput } from '../../lib/labour/schema.ts';
import * as workers from '../repos/workers.ts';
import { isMemberWithRole } from '../repos/members.ts';
import { audit } from '../repos/audit.ts';

export const listWorkers = (actor: Actor) => workers.listWorkers(actor.companyId);

async function checkLead(actor: Actor, input: Partial<WorkerInput>) {
  if (input.crewLeadUserId && !(await isMemberWithRole(actor.companyId, input.crewLeadUserId, ['crew_lead', 'owner']))) {
    throw new AppError('BAD_INPUT', 'Some fields need attention.', { crewLeadUserId: 'Choose a crew lead of this company.' });
  }
}

function duplicate(name: string) {
  return new AppError('CONFLICT', `There is already a worker named ${name}.`, { name: 'Another worker has this name; add an initial.' });
}

export async function getWorker(actor: Actor, id: number): Promise<Worker> {
  const w = await workers.findWorker(actor.companyId, id);
  if (!w) throw notFound('That worker');
  return w;
}

export async function createWorker(actor: Actor, input: WorkerInput): Promise<Worker> {
  await checkLead(actor, input);
  try {
    const id = await db().transaction(async (trx) => {
      const newId = await workers.insertWorker(actor.companyId, input, trx);
      await audit(trx, actor, 'worker', newId, 'create', { name: input.name, wageCents: input.wageCents });
      return newId;
    });
    return getWorker(actor, id);
  } catch (err) {
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY') throw duplicate(input.name);
    throw err;
  }
}

export async function updateWorker(actor: Actor, id: number, input: Partial<WorkerInput>): Promise<Worker> {
  await getWorker(actor, id);
  await checkLead(actor, input);
  try {
    await db().transaction(async (trx) => {
      await workers.updateWorker(actor.companyId, id, input, trx);
      // A raise changes hours logged from now on; past entries keep the wage they were costed at.
      await audit(trx, actor, 'worker', id, 'update', input);
    });
  } catch (err) {
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY' && input.name) throw duplicate(input.name);
    throw err;
  }
  return getWorker(actor, id);
}

/** Members who lead crews (and the owner, who may), for a worker's crew. */
export async function crewLeadOptions(actor: Actor): Promise<{ id: string; name: string }[]> {
  const rows = await db()('member as m').join('user as u', 'u.id', 'm.userId').where('m.organizationId', actor.companyId).whereIn('m.role', ['crew_lead', 'owner']).orderBy('u.name').select('u.id', 'u.name');
  return rows.map((r) => ({ id: r.id as string, name: r.name as string }));
}
