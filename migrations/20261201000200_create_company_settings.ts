import type { Knex } from 'knex';
import { percent, timestamps } from '../src/server/migration-helpers.ts';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('company_settings', (t) => {
    t.string('organization_id', 36).primary().references('id').inTable('organization').onDelete('CASCADE');
    t.string('currency', 3).notNullable().defaultTo('USD');
    t.integer('payment_terms_days').notNullable().defaultTo(30);
    percent(t, 'target_margin_pct').notNullable().defaultTo(30);
    percent(t, 'labour_burden_pct').notNullable().defaultTo(30);
    t.enum('tax_mode', ['none', 'materials', 'all']).notNullable().defaultTo('materials');
    percent(t, 'tax_rate_pct').notNullable().defaultTo(0);
    /** Bids round their price to a multiple of this (500 = nearest $5). */
    t.bigInteger('bid_rounding_cents').notNullable().defaultTo(500);
    t.integer('next_job_number').notNullable().defaultTo(1);
    t.string('address_line', 255);
    t.string('city', 120);
    t.string('region', 60);
    t.string('postal_code', 20);
    t.string('phone', 40);
    t.string('email', 255);
    t.string('license_number', 60);
    t.string('timezone', 64).notNullable().defaultTo('America/Chicago');
    timestamps(t, knex);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('company_settings');
}
