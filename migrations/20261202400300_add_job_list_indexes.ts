import type { Knex } from 'knex';

// The jobs table sorts by lead date and by last change as often as by code: with these the
// page is read in index order (InnoDB appends the id, the tie-break) instead of sorted.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.index(['organization_id', 'lead_date'], 'jobs_org_lead_date_idx');
    t.index(['organization_id', 'updated_at'], 'jobs_org_updated_at_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.dropIndex([], 'jobs_org_lead_date_idx');
    t.dropIndex([], 'jobs_org_updated_at_idx');
  });
}
