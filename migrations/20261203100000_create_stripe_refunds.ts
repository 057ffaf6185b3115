import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';

// Every refund of a card payment at the card processor, whoever made it. A refund asked in
// Tallypost writes its row first (status `requested`) and asks Stripe with an idempotency key
// made from the row, so a retry reuses the key and cannot refund twice; a refund made at
// Stripe gets its row from the webhook. The row keeps the furthest state Stripe reported,
// so events arriving in any order end the same; `refunds` holds what is counted.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('stripe_refunds', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('payment_id').unsigned().notNullable().references('id').inTable('payments');
    t.bigInteger('invoice_id').unsigned().notNullable().references('id').inTable('invoices');
    /** what was asked, or what Stripe refunded, in the company's cents */
    cents(t, 'amount_cents').notNullable();
    t.string('reason', 500);
    /** who asked in Tallypost; null for a refund made at the processor */
    t.string('requested_by', 36);
    /** the asker's retry token (or a random one): with the id, the idempotency key sent to Stripe */
    t.string('request_key', 64).notNullable();
    t.string('stripe_refund', 64).unique();
    /** requested, refused, requires_action, pending, succeeded, failed, canceled (lib/billing/refunds.ts) */
    t.string('status', 16).notNullable();
    /** why the processor refused the request or the refund failed */
    t.string('failure', 500);
    timestamps(t, knex);
    t.unique(['organization_id', 'payment_id', 'request_key'], { indexName: 'stripe_refunds_request_key_uq' });
    t.index(['organization_id', 'invoice_id'], 'stripe_refunds_invoice_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('stripe_refunds');
}
