import { auth } from '../auth/auth.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import type { Knex } from 'knex';
import { isRole, type Role } from '../../lib/auth/permissions.ts';
import * as members from '../repos/members.ts';
import { db } from '../db.ts';
import { audit } from '../repos/audit.ts';

function authError(err: unknown, fallback: string): AppError {
  const e = err as { status?: string | number; body?: { code?: string; message?: string }; message?: string };
  const msg = e.body?.message ?? e.message ?? fallback;
  if (/already a member/i.test(msg)) return new AppError('ALREADY_MEMBER', msg, { email: msg });
  if (/already invited/i.test(msg)) return new AppError('CONFLICT', msg, { email: msg });
  if (e.status === 'FORBIDDEN' || e.status === 403) return new AppError('FORBIDDEN', msg);
  if (e.status === 'NOT_FOUND' || e.status === 404) return new AppError('NOT_FOUND', msg);
  return new AppError('RULE_BROKEN', msg);
}

export async function listMembersAndInvites(actor: Actor) {
  const [list, invites] = await Promise.all([members.listMembers(actor.companyId), members.pendingInvitations(actor.companyId)]);
  return { members: list, invitations: invites };
}

/** Invites through better-auth (its access control checks the owner's right too); the mail goes through the outbox. */
export async function invite(actor: Actor, headers: Headers, input: { email: string; role: Role }) {
  try {
    const inv = await auth().api.createInvitation({ headers, body: { email: input.email, role: input.role, organizationId: actor.companyId, resend: true } });
    await audit(db(), actor, 'invitation', inv.id, 'create', { email: input.email, role: input.role });
    return { id: inv.id, email: inv.email, role: inv.role, status: inv.status, expiresAt: new Date(inv.expiresAt).toISOString() };
  } catch (err) {
    throw authError(err, 'The invitation could not be sent.');
  }
}

/**
 * The company's members, locked for this transaction: role changes and removals in one
 * company happen one at a time, so two owners demoting each other at once cannot leave
 * the company with none.
 */
async function lockMembers(trx: Knex.Transaction, companyId: string): Promise<{ id: string; userId: string; role: string }[]> {
  return trx('member').where('organizationId', companyId).forUpdate().select('id', 'userId', 'role');
}

/**
 * Changes a member's role to exactly one of the four (the schema and a CHECK constraint
 * refuse lists). The last owner is never demoted. better-auth's own update-member-role is
 * closed (src/pages/api/auth/[...all].ts) and refused by its hook (auth.ts).
 */
export async function changeRole(actor: Actor, memberId: string, role: Role) {
  if (!isRole(role)) throw new AppError('BAD_INPUT', 'Choose a role.', { role: 'Choose a role.' });
  return db().transaction(async (trx) => {
    const locked = await lockMembers(trx, actor.companyId);
    const target = locked.find((m) => m.id === memberId);
    if (!target) throw notFound('That member');
    const owners = locked.filter((m) => m.role === 'owner' && m.id !== memberId).length;
    if (target.role === 'owner' && role !== 'owner' && owners === 0) {
      throw new AppError('LAST_OWNER', 'A company needs at least one owner. Make someone else owner first.');
    }
    const m = (await members.findMember(actor.companyId, memberId, trx))!;
    if (target.role !== role) {
      await trx('member').where({ id: memberId, organizationId: actor.companyId }).update({ role });
      await audit(trx, actor, 'member', memberId, 'role', { from: target.role, to: role });
    }
    return { ...m, role };
  });
}

/** Removes a member; never the last owner. Their sessions in this company end at once. */
export async function removeMember(actor: Actor, memberId: string) {
  await db().transaction(async (trx) => {
    const locked = await lockMembers(trx, actor.companyId);
    const target = locked.find((m) => m.id === memberId);
    if (!target) throw notFound('That member');
    if (target.role === 'owner' && !locked.some((m) => m.role === 'owner' && m.id !== memberId)) {
      throw new AppError('LAST_OWNER', 'A company needs at least one owner.');
    }
    const m = (await members.findMember(actor.companyId, memberId, trx))!;
    await trx('member').where({ id: memberId, organizationId: actor.companyId }).delete();
    // Their other sessions may still name this company as active; the next request of each
    // finds no membership and drops it (see identify()), and this clears it at once.
    await trx('session').where('userId', target.userId).whereRaw('activeOrganizationId = ?', [actor.companyId]).update({ activeOrganizationId: null });
    await audit(trx, actor, 'member', memberId, 'remove', { email: m.email });
  });
}

export async function cancelInvitation(actor: Actor, headers: Headers, invitationId: string) {
  const pending = await members.pendingInvitations(actor.companyId);
  if (!pending.some((i) => i.id === invitationId)) throw notFound('That invitation');
  try {
    await auth().api.cancelInvitation({ headers, body: { invitationId } });
  } catch (err) {
    throw authError(err, 'The invitation could not be cancelled.');
  }
}
