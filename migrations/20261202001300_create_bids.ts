import type { Knex } from 'knex';
import { cents, percent, tenant, timestamps } from '../src/server/migration-helpers.ts';
import { COST_CATEGORIES } from '../src/lib/costs/categories.ts';

// Bid versions of a job. Each keeps what it was priced from (input, recipe, rate values) and
// its takeoff in queryable columns and rows, so calibration can compare it with actuals.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('bids', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.integer('version_no').notNullable();
    /** draft, sent, accepted, declined, superseded */
    t.string('status', 16).notNullable().defaultTo('draft');
    t.string('title', 200).notNullable().defaultTo('');
    t.bigInteger('style_id').unsigned().references('id').inTable('fence_styles').onDelete('SET NULL');
    t.string('style_name', 120).notNullable();
    /** runs, gates, extras, overrides and target as saved */
    t.json('input').notNullable();
    /** the style's recipe as priced */
    t.json('recipe').notNullable();
    t.json('takeoff').notNullable();
    t.json('warnings').notNullable();
    t.text('scope');
    t.text('terms');
    t.text('exclusions');
    t.enum('target_mode', ['margin', 'markup']).notNullable();
    percent(t, 'target_pct').notNullable();
    cents(t, 'cost_cents').notNullable();
    cents(t, 'exact_price_cents').notNullable();
    cents(t, 'price_cents').notNullable();
    cents(t, 'taxable_cents').notNullable();
    cents(t, 'tax_cents').notNullable();
    cents(t, 'total_cents').notNullable();
    t.decimal('margin_pct', 9, 4);
    t.decimal('markup_pct', 9, 4);
    /** feet */
    t.decimal('total_length_ft', 10, 3).notNullable();
    t.decimal('fence_ft', 10, 3).notNullable();
    t.integer('bay_count').notNullable();
    t.integer('post_count').notNullable();
    t.integer('end_posts').notNullable();
    t.integer('corner_posts').notNullable();
    t.integer('line_posts').notNullable();
    t.integer('gate_posts').notNullable();
    t.integer('hole_count').notNullable();
    t.integer('gate_count').notNullable();
    t.integer('gate_leaves').notNullable();
    /** ft³ */
    t.decimal('concrete_cuft', 10, 4);
    t.integer('concrete_bags');
    t.decimal('gravel_cuft', 10, 4);
    t.integer('gravel_bags');
    t.decimal('board_feet', 12, 3).notNullable();
    /** days, a half day as 0.5 */
    t.decimal('rental_days', 6, 1).notNullable();
    /** person-hours */
    t.decimal('labour_hours', 10, 3).notNullable();
    t.integer('crew_size').notNullable();
    t.string('created_by', 36);
    t.string('accepted_by', 36);
    t.specificType('sent_at', 'DATETIME(3)');
    t.specificType('accepted_at', 'DATETIME(3)');
    t.specificType('declined_at', 'DATETIME(3)');
    timestamps(t, knex);
    t.unique(['organization_id', 'job_id', 'version_no']);
    t.index(['organization_id', 'status']);
  });
  await knex.schema.createTable('bid_lines', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('bid_id').unsigned().notNullable().references('id').inTable('bids').onDelete('CASCADE');
    t.integer('sort').notNullable();
    t.string('line_key', 120).notNullable();
    /** material, labour, rental, extra */
    t.string('kind', 16).notNullable();
    t.enum('category', [...COST_CATEGORIES]).notNullable();
    t.string('description', 255).notNullable();
    t.string('sku', 80);
    t.bigInteger('item_id').unsigned().references('id').inTable('price_book_items').onDelete('SET NULL');
    t.string('unit', 20).notNullable();
    /** materials: the takeoff's quantity before waste and after it (whole units to buy) */
    t.decimal('takeoff_qty', 14, 4);
    percent(t, 'waste_pct');
    t.decimal('buy_qty', 14, 4);
    /** the quantity priced (an override's, when there is one) */
    t.decimal('qty', 14, 4).notNullable();
    cents(t, 'unit_cost_cents').notNullable();
    cents(t, 'amount_cents').notNullable();
    t.boolean('priced').notNullable();
    t.boolean('overridden').notNullable().defaultTo(false);
    t.decimal('original_qty', 14, 4);
    cents(t, 'original_unit_cost_cents');
    cents(t, 'original_amount_cents');
    t.string('override_note', 200);
    t.string('supplier_name', 160);
    t.date('last_seen_on');
    t.index(['organization_id', 'bid_id']);
    t.index(['organization_id', 'sku']);
  });
  await knex.schema.createTable('bid_cost_categories', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('bid_id').unsigned().notNullable().references('id').inTable('bids').onDelete('CASCADE');
    t.enum('category', [...COST_CATEGORIES]).notNullable();
    cents(t, 'amount_cents').notNullable();
    t.unique(['bid_id', 'category']);
  });
  await knex.schema.createTable('bid_labour', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('bid_id').unsigned().notNullable().references('id').inTable('bids').onDelete('CASCADE');
    /** posts, rails_infill, gates, setup */
    t.string('task', 20).notNullable();
    t.decimal('crew_hours', 10, 4).notNullable();
    t.decimal('man_hours', 10, 4).notNullable();
    t.unique(['bid_id', 'task']);
  });
  await knex.schema.createTable('bid_rate_snapshots', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('bid_id').unsigned().notNullable().references('id').inTable('bids').onDelete('CASCADE');
    t.string('kind', 40).notNullable();
    t.decimal('value', 14, 4).notNullable();
    t.bigInteger('rate_version_id').unsigned().references('id').inTable('labour_rate_versions').onDelete('SET NULL');
    t.unique(['bid_id', 'kind']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['bid_rate_snapshots', 'bid_labour', 'bid_cost_categories', 'bid_lines', 'bids']) await knex.schema.dropTableIfExists(name);
}
