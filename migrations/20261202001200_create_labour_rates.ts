import type { Knex } from 'knex';
import { tenant } from '../src/server/migration-helpers.ts';

// Labour productivity and crew rates by style and kind, versioned from the start: a change
// is a new version with who, when and why; bids keep the values they were priced with.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('labour_rates', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('style_id').unsigned().notNullable().references('id').inTable('fence_styles').onDelete('CASCADE');
    /** hole_hours, post_set_hours, rails_infill_hours_per_ft, gate_hours, setup_hours, crew_size, crew_wage_cents, rental_day_hours */
    t.string('kind', 40).notNullable();
    t.unique(['organization_id', 'style_id', 'kind']);
  });
  await knex.schema.createTable('labour_rate_versions', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('rate_id').unsigned().notNullable().references('id').inTable('labour_rates').onDelete('CASCADE');
    t.integer('version_no').notNullable();
    t.decimal('value', 14, 4).notNullable();
    t.text('reason').notNullable();
    t.string('created_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.unique(['rate_id', 'version_no']);
    t.index(['organization_id', 'rate_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('labour_rate_versions');
  await knex.schema.dropTableIfExists('labour_rates');
}
