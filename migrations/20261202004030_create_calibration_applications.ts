import type { Knex } from 'knex';
import { tenant } from '../src/server/migration-helpers.ts';

// Each calibrated value the estimator applied: what it replaced, the jobs and the backtest
// behind it, who and why. Labour rates also get their new version in labour_rate_versions;
// a waste percent lives in the style's recipe, so this is its history.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('calibration_applications', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('style_id').unsigned().notNullable().references('id').inTable('fence_styles').onDelete('CASCADE');
    /** labour:posts, labour:rails_infill, waste:concrete, ... */
    t.string('item_key', 40).notNullable();
    /** rate kind or waste key → value, before and after */
    t.json('old_values').notNullable();
    t.json('new_values').notNullable();
    t.integer('jobs').notNullable();
    /** leave-one-out mean absolute percentage error and bias of cost, percent */
    t.decimal('mape_before', 9, 4).notNullable();
    t.decimal('mape_after', 9, 4).notNullable();
    t.decimal('bias_before', 9, 4).notNullable();
    t.decimal('bias_after', 9, 4).notNullable();
    t.string('reason', 500).notNullable();
    t.string('created_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['organization_id', 'style_id', 'created_at'], 'calibration_applications_style_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('calibration_applications');
}
