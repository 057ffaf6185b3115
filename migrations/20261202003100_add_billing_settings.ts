import type { Knex } from 'knex';
import { cents, percent } from '../src/server/migration-helpers.ts';

// What invoicing reads from the company: the deposit cap rule (the lesser of a percent of
// the contract and an amount, either may be empty), the default retainage on commercial
// jobs, the invoice counter and the reminder schedule (days from the due date).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('company_settings', (t) => {
    percent(t, 'deposit_cap_pct');
    cents(t, 'deposit_cap_cents');
    percent(t, 'default_retainage_pct').notNullable().defaultTo(10);
    t.string('invoice_prefix', 8).notNullable().defaultTo('INV');
    t.integer('next_invoice_number').notNullable().defaultTo(1);
    t.boolean('reminders_enabled').notNullable().defaultTo(true);
    t.string('reminder_offsets', 100).notNullable().defaultTo('-3,0,7,14');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('company_settings', (t) => {
    for (const c of ['deposit_cap_pct', 'deposit_cap_cents', 'default_retainage_pct', 'invoice_prefix', 'next_invoice_number', 'reminders_enabled', 'reminder_offsets']) t.dropColumn(c);
  });
}
