import type { Knex } from 'knex';

/**
 * The company each person last worked in, so signing in lands there (not in the first of
 * their companies by name). Written when they switch, create or join a company.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('user_last_company', (t) => {
    t.string('user_id', 36).primary().references('id').inTable('user').onDelete('CASCADE');
    t.string('organization_id', 36).notNullable().references('id').inTable('organization').onDelete('CASCADE');
    t.specificType('updated_at', 'DATETIME(3)').notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('user_last_company');
}
