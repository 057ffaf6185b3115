import type { Knex } from 'knex';
import { percent } from '../src/server/migration-helpers.ts';

// Job costing flags a cost category running more than this percent over its estimate; each
// company sets its own threshold (10 % unless changed).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('company_settings', (t) => {
    percent(t, 'cost_flag_pct').notNullable().defaultTo(10);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('company_settings', (t) => {
    t.dropColumn('cost_flag_pct');
  });
}
