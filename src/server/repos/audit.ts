import type { Knex } from 'knex';
import type { Actor } from '../http.ts';

/** One line of the audit trail: who did what to which record, and the details. */
export async function audit(q: Knex | Knex.Transaction, actor: Actor, entity: string, entityId: string | number, action: string, detail: unknown = null): Promise<void> {
  await q('audit_log').insert({
    organization_id: actor.companyId,
    user_id: actor.userId || null,
    entity,
    entity_id: String(entityId),
    action,
    detail: detail === null ? null : JSON.stringify(detail),
  });
}
