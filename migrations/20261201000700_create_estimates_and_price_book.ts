import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';
import { COST_CATEGORIES } from '../src/lib/costs/categories.ts';

// Shared ground for bids, actual costs and margins: a job's estimated cost by category
// (written when a bid is accepted, and by approved change orders), suppliers, and the
// price book whose unit costs bids use and supplier receipts refresh.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('suppliers', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.string('name', 160).notNullable();
    t.string('email', 255);
    t.string('phone', 40);
    t.text('notes');
    timestamps(t, knex);
    t.unique(['organization_id', 'name']);
  });
  await knex.schema.createTable('price_book_items', (t) => {
    t.bigIncrements('id');
    tenant(t);
    /** The supplier's item number or our own code, unique in the company. */
    t.string('sku', 80).notNullable();
    t.string('name', 200).notNullable();
    t.enum('category', [...COST_CATEGORIES]).notNullable().defaultTo('material');
    /** each, ft, bag, roll, box, hour, day, ... */
    t.string('unit', 20).notNullable();
    cents(t, 'unit_cost_cents').notNullable();
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('SET NULL');
    t.date('last_seen_on');
    t.boolean('active').notNullable().defaultTo(true);
    t.text('notes');
    timestamps(t, knex);
    t.unique(['organization_id', 'sku']);
    t.index(['organization_id', 'category']);
  });
  await knex.schema.createTable('price_book_changes', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('item_id').unsigned().notNullable().references('id').inTable('price_book_items').onDelete('CASCADE');
    cents(t, 'old_unit_cost_cents');
    cents(t, 'new_unit_cost_cents').notNullable();
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('SET NULL');
    /** manual, csv_import, receipt */
    t.string('source', 20).notNullable();
    t.string('source_ref', 100);
    t.string('changed_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.boolean('seen_by_estimator').notNullable().defaultTo(false);
    t.index(['organization_id', 'item_id']);
  });
  await knex.schema.createTable('job_estimates', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.enum('category', [...COST_CATEGORIES]).notNullable();
    cents(t, 'amount_cents').notNullable();
    /** bid: from the accepted bid; change_order: an approved change order's cost */
    t.string('source', 20).notNullable().defaultTo('bid');
    /** The bid or change order id the amount came from. */
    t.bigInteger('source_id').unsigned();
    timestamps(t, knex);
    t.index(['organization_id', 'job_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['job_estimates', 'price_book_changes', 'price_book_items', 'suppliers']) await knex.schema.dropTableIfExists(name);
}
