import { db } from '../db.ts';
import { auth } from './auth.ts';
import { env } from '../env.ts';
import { isRole, type Role } from '../../lib/auth/permissions.ts';

export interface Membership {
  organizationId: string;
  name: string;
  slug: string;
  role: Role;
}

export interface RequestIdentity {
  user: { id: string; name: string; email: string } | null;
  sessionId: string | null;
  company: { id: string; name: string; slug: string } | null;
  role: Role | null;
  memberships: Membership[];
}

const nobody: RequestIdentity = { user: null, sessionId: null, company: null, role: null, memberships: [] };

export async function membershipsOf(userId: string): Promise<Membership[]> {
  const rows = await db()('member as m')
    .join('organization as o', 'o.id', 'm.organizationId')
    .where('m.userId', userId)
    .orderBy('o.name')
    .select('m.organizationId', 'o.name', 'o.slug', 'm.role');
  return rows.filter((r) => isRole(r.role)) as Membership[];
}

/**
 * Who is asking. The session comes from better-auth; membership and role are read fresh
 * from the member table on every request, so a member removed or demoted is refused on
 * their very next request in every open session. Sessions also have an absolute lifetime.
 */
export async function identify(headers: Headers): Promise<RequestIdentity> {
  const found = await auth().api.getSession({ headers });
  if (!found) return nobody;
  const { session, user } = found;
  const createdAt = new Date(session.createdAt).getTime();
  if (Date.now() - createdAt > env().SESSION_MAX_AGE * 1000) {
    await db()('session').where('id', session.id).delete();
    return nobody;
  }
  const memberships = await membershipsOf(user.id);
  const activeId = (session as { activeOrganizationId?: string | null }).activeOrganizationId ?? null;
  let active = memberships.find((m) => m.organizationId === activeId) ?? null;
  if (!active && memberships.length > 0) {
    // No company chosen yet, or removed from the one that was: fall back to the first
    // company the person still belongs to, and remember it on this session.
    active = memberships[0];
    await db()('session').where('id', session.id).update({ activeOrganizationId: active.organizationId });
  } else if (!active && activeId) {
    await db()('session').where('id', session.id).update({ activeOrganizationId: null });
  }
  return {
    user: { id: user.id, name: user.name, email: user.email },
    sessionId: session.id,
    company: active ? { id: active.organizationId, name: active.name, slug: active.slug } : null,
    role: active?.role ?? null,
    memberships,
  };
}
