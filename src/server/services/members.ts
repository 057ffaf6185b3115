import { auth } from '../auth/auth.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import type { Role } from '../../lib/auth/permissions.ts';
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

async function ownersLeft(actor: Actor, exceptMemberId: string): Promise<number> {
  return (await members.listMembers(actor.companyId)).filter((m) => m.role === 'owner' && m.memberId !== exceptMemberId).length;
}

export async function changeRole(actor: Actor, headers: Headers, memberId: string, role: Role) {
  const m = await members.findMember(actor.companyId, memberId);
  if (!m) throw notFound('That member');
  if (m.role === 'owner' && role !== 'owner' && (await ownersLeft(actor, memberId)) === 0) {
    throw new AppError('LAST_OWNER', 'A company needs at least one owner. Make someone else owner first.');
  }
  try {
    await auth().api.updateMemberRole({ headers, body: { memberId, role, organizationId: actor.companyId } });
  } catch (err) {
    throw authError(err, 'The role could not be changed.');
  }
  await audit(db(), actor, 'member', memberId, 'role', { from: m.role, to: role });
  return { ...m, role };
}

export async function removeMember(actor: Actor, headers: Headers, memberId: string) {
  const m = await members.findMember(actor.companyId, memberId);
  if (!m) throw notFound('That member');
  if (m.role === 'owner' && (await ownersLeft(actor, memberId)) === 0) {
    throw new AppError('LAST_OWNER', 'A company needs at least one owner.');
  }
  try {
    await auth().api.removeMember({ headers, body: { memberIdOrEmail: memberId, organizationId: actor.companyId } });
  } catch (err) {
    throw authError(err, 'The member could not be removed.');
  }
  // Their other sessions may still name this company as active; the next request of each
  // finds no membership and drops it (see identify()), and this clears it at once.
  await db()('session').where('userId', m.userId).whereRaw('activeOrganizationId = ?', [actor.companyId]).update({ activeOrganizationId: null });
  await audit(db(), actor, 'member', memberId, 'remove', { email: m.email });
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
