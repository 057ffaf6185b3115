import type { Knex } from 'knex';

/**
 * A counter per company, raised after every change a member makes (see src/server/report-cache.ts):
 * a report computed at one version is served again, in any app process, while the version holds.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('company_data_versions', (t) => {
    t.string('organization_id', 36).primary().references('id').inTable('organization').onDelete('CASCADE');
    t.bigInteger('version').unsigned().notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('company_data_versions');
}
