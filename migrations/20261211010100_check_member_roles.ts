import type { Knex } from 'knex';

/**
 * A member's and an invitation's role is exactly one of the four, whatever wrote it: the
 * database refuses anything else (better-auth would store a list such as "owner,crew_lead").
 * Rows that already hold something else are settled first: a member keeps the least of the
 * roles listed (crew lead when none is ours), a pending invitation is cancelled (its
 * role recorded as crew lead, like any other such invitation's).
 */
const ROLES = ['owner', 'bookkeeper', 'estimator', 'crew_lead'];
/** Least power first. */
const LEAST_FIRST = ['crew_lead', 'estimator', 'bookkeeper', 'owner'];

export async function up(knex: Knex): Promise<void> {
  const odd = await knex('member').whereNotIn('role', ROLES).select('id', 'role');
  for (const m of odd) {
    const listed = String(m.role).split(',').map((s) => s.trim());
    const role = LEAST_FIRST.find((r) => listed.includes(r)) ?? 'crew_lead';
    await knex('member').where('id', m.id).update({ role });
  }
  const badInvitation = (q: Knex.QueryBuilder) => q.whereNotIn('role', ROLES).orWhereNull('role');
  await knex('invitation').where(badInvitation).andWhere('status', 'pending').update({ status: 'canceled' });
  await knex('invitation').where(badInvitation).update({ role: 'crew_lead' });
  const list = ROLES.map((r) => `'${r}'`).join(', ');
  await knex.raw(`ALTER TABLE member ADD CONSTRAINT member_role_is_one CHECK (role IN (${list}))`);
  await knex.raw(`ALTER TABLE invitation ADD CONSTRAINT invitation_role_is_one CHECK (role IN (${list}))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE invitation DROP CONSTRAINT invitation_role_is_one');
  await knex.raw('ALTER TABLE member DROP CONSTRAINT member_role_is_one');
}
