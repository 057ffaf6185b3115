import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { Role } from '../../lib/auth/permissions.ts';

type Q = Knex | Knex.Transaction;

export interface MemberRow {
  memberId: string;
  userId: string;
  name: string;
  email: string;
  role: Role;
  joinedAt: string;
}

export interface InvitationRow {
  id: string;
  email: string;
  role: Role;
  status: string;
  expiresAt: string;
}

export async function listMembers(companyId: string, q: Q = db()): Promise<MemberRow[]> {
  const rows = await q('member as m')
    .join('user as u', 'u.id', 'm.userId')
    .where('m.organizationId', companyId)
    .orderBy('u.name')
    .select('m.id as memberId', 'u.id as userId', 'u.name', 'u.email', 'm.role', 'm.createdAt');
  return rows.map((r) => ({ memberId: r.memberId, userId: r.userId, name: r.name, email: r.email, role: r.role, joinedAt: new Date(r.createdAt).toISOString() }));
}

export async function findMember(companyId: string, memberId: string, q: Q = db()): Promise<MemberRow | undefined> {
  return (await listMembers(companyId, q)).find((m) => m.memberId === memberId);
}

export async function pendingInvitations(companyId: string, q: Q = db()): Promise<InvitationRow[]> {
  const rows = await q('invitation').where({ organizationId: companyId, status: 'pending' }).andWhere('expiresAt', '>', q.fn.now(3)).orderBy('createdAt', 'desc');
  return rows.map((r) => ({ id: r.id, email: r.email, role: r.role, status: r.status, expiresAt: new Date(r.expiresAt).toISOString() }));
}

/** People of the company in a role, for pickers (estimator, crew lead). */
export async function membersInRoles(companyId: string, roles: Role[], q: Q = db()): Promise<{ userId: string; name: string; role: Role }[]> {
  const rows = await q('member as m').join('user as u', 'u.id', 'm.userId').where('m.organizationId', companyId).whereIn('m.role', roles).orderBy('u.name').select('u.id as userId', 'u.name', 'm.role');
  return rows as { userId: string; name: string; role: Role }[];
}

export async function isMemberWithRole(companyId: string, userId: string, roles: Role[], q: Q = db()): Promise<boolean> {
  return Boolean(await q('member').where({ organizationId: companyId, userId }).whereIn('role', roles).first('id'));
}
