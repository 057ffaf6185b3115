import { db } from '../db.ts';
import { ROLE_LABELS, isRole } from '../../lib/auth/permissions.ts';

/** What the public accept page may show about a pending invitation (its id is unguessable). */
export async function invitationSummary(id: string): Promise<{ email: string; company: string; role: string } | null> {
  if (!id || id.length > 64) return null;
  const r = await db()('invitation as i')
    .join('organization as o', 'o.id', 'i.organizationId')
    .where('i.id', id)
    .andWhere('i.status', 'pending')
    .andWhere('i.expiresAt', '>', db().fn.now(3))
    .first('i.email', 'i.role', 'o.name');
  if (!r) return null;
  const role = String(r.role ?? '');
  return { email: r.email, company: r.name, role: isRole(role) ? ROLE_LABELS[role] : role };
}
