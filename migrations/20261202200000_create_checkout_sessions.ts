import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';

// The card processor's Checkout Sessions made for an invoice, so the ones still open can be
// expired when the invoice is paid another way, voided, or owes a different amount.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('checkout_sessions', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('invoice_id').unsigned().notNullable().references('id').inTable('invoices').onDelete('CASCADE');
    t.string('stripe_session', 80).notNullable().unique();
    /** the balance it was made for, in the company's cents */
    cents(t, 'amount_cents').notNullable();
    /** open, complete, expired */
    t.string('status', 16).notNullable().defaultTo('open');
    timestamps(t, knex);
    t.index(['organization_id', 'invoice_id', 'status'], 'checkout_sessions_invoice_idx');
    t.index(['status'], 'checkout_sessions_status_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('checkout_sessions');
}
