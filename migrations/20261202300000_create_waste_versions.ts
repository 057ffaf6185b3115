import type { Knex } from 'knex';
import { tenant } from '../src/server/migration-helpers.ts';

// Each change of a style's waste percent for one material group (the recipe's wastePct),
// with the value it replaced, who and why: the waste counterpart of labour_rate_versions.
// The recipe keeps the current value; bids keep the recipe they were priced with.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('waste_versions', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('style_id').unsigned().notNullable().references('id').inTable('fence_styles').onDelete('CASCADE');
    /** posts, rails, infill, cap, concrete, gravel, hardware, gates */
    t.string('waste_key', 16).notNullable();
    t.integer('version_no').notNullable();
    /** percent over the takeoff, before (null when none was recorded) and after */
    t.decimal('old_pct', 7, 3);
    t.decimal('new_pct', 7, 3).notNullable();
    t.text('reason').notNullable();
    t.string('created_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.unique(['style_id', 'waste_key', 'version_no']);
    t.index(['organization_id', 'style_id', 'created_at'], 'waste_versions_style_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('waste_versions');
}
