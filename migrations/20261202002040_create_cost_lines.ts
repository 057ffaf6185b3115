import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';
import { COST_CATEGORIES } from '../src/lib/costs/categories.ts';

// Actual costs other than crew hours and rentals: each committed receipt line becomes one
// or more cost lines (one per part of a split; job null while unmatched or for overhead),
// and other costs (permits, dump fees, subcontractors) are entered by hand.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('cost_lines', (t) => {
    t.bigIncrements('id');
    tenant(t);
    /** receipt or manual */
    t.string('source', 10).notNullable();
    t.bigInteger('import_line_id').unsigned().references('id').inTable('import_lines').onDelete('CASCADE');
    t.bigInteger('job_id').unsigned().references('id').inTable('jobs').onDelete('SET NULL');
    /** A company cost that belongs to no job (shop supplies, yard stock). */
    t.boolean('overhead').notNullable().defaultTo(false);
    t.enum('category', [...COST_CATEGORIES]).notNullable();
    t.date('cost_date').notNullable();
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('SET NULL');
    t.string('description', 500);
    t.string('sku', 80);
    /** in `unit`; a split part carries its share of the line's quantity */
    t.decimal('quantity', 14, 4);
    t.string('unit', 20);
    cents(t, 'amount_cents').notNullable();
    t.bigInteger('price_book_item_id').unsigned().references('id').inTable('price_book_items').onDelete('SET NULL');
    /** The part's share of its receipt line when it was split by percent. */
    t.decimal('split_pct', 9, 4);
    t.string('created_by', 36);
    timestamps(t, knex);
    t.index(['organization_id', 'job_id', 'category']);
    t.index(['organization_id', 'cost_date']);
    t.index(['organization_id', 'import_line_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('cost_lines');
}
