import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';
import { EQUIPMENT_KINDS } from '../src/lib/rentals/rates.ts';

// The company's usual rental rates per kind of equipment, and each rental on a job with the
// rates it was priced at and the periods the cheapest combination chose.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('equipment_rates', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.enum('kind', [...EQUIPMENT_KINDS]).notNullable();
    cents(t, 'half_day_cents');
    cents(t, 'day_cents');
    cents(t, 'week_cents');
    timestamps(t, knex);
    t.unique(['organization_id', 'kind']);
  });
  await knex.schema.createTable('rentals', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.enum('kind', [...EQUIPMENT_KINDS]).notNullable();
    t.string('description', 200);
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('SET NULL');
    /** Wall-clock pick-up and return, as written on the rental ticket. */
    t.specificType('start_at', 'DATETIME').notNullable();
    t.specificType('end_at', 'DATETIME').notNullable();
    cents(t, 'half_day_cents');
    cents(t, 'day_cents');
    cents(t, 'week_cents');
    cents(t, 'delivery_cents').notNullable().defaultTo(0);
    cents(t, 'fuel_cents').notNullable().defaultTo(0);
    t.integer('weeks').notNullable().defaultTo(0);
    t.integer('days').notNullable().defaultTo(0);
    t.integer('half_days').notNullable().defaultTo(0);
    /** Null until the rental has rates to price it with. */
    cents(t, 'cost_cents');
    t.text('notes');
    t.string('entered_by', 36);
    timestamps(t, knex);
    t.index(['organization_id', 'job_id']);
    t.index(['organization_id', 'start_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('rentals');
  await knex.schema.dropTableIfExists('equipment_rates');
}
