import type { Knex } from 'knex';
import { cents, percent, tenant, timestamps } from '../src/server/migration-helpers.ts';

// Invoices keep their computed totals in cents so billed, retainage and balances per job
// are plain SQL sums: billed to date = SUM(contract_billed_cents) over issued invoices.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('invoices', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs');
    t.bigInteger('customer_id').unsigned().notNullable().references('id').inTable('customers');
    /** deposit, progress, final, extra */
    t.string('kind', 12).notNullable();
    /** draft → issued → partly_paid → paid, or void */
    t.string('status', 12).notNullable().defaultTo('draft');
    /** Assigned at issue, sequential per company without gaps. */
    t.integer('number');
    t.string('number_text', 24);
    t.date('issued_on');
    t.date('due_on');
    /** due_on_receipt, net_15, net_30, custom */
    t.string('terms', 16).notNullable();
    t.integer('terms_days').notNullable();
    t.text('notes');
    t.string('tax_mode', 12).notNullable();
    percent(t, 'tax_rate_pct').notNullable();
    /** For a deposit: the percent of the contract asked; for a progress bill: percent complete. */
    percent(t, 'basis_pct');
    /** A deposit asked as an amount rather than a percent. */
    cents(t, 'requested_cents');
    percent(t, 'retainage_pct').notNullable().defaultTo(0);
    cents(t, 'subtotal_cents').notNullable().defaultTo(0);
    cents(t, 'taxable_cents').notNullable().defaultTo(0);
    cents(t, 'tax_cents').notNullable().defaultTo(0);
    /** The part of the subtotal that counts against the contract (everything but retainage released). */
    cents(t, 'contract_billed_cents').notNullable().defaultTo(0);
    cents(t, 'retainage_held_cents').notNullable().defaultTo(0);
    cents(t, 'retainage_released_cents').notNullable().defaultTo(0);
    cents(t, 'total_cents').notNullable().defaultTo(0);
    /** Payments applied less refunds, kept in step with the payment rows under the invoice's row lock. */
    cents(t, 'paid_cents').notNullable().defaultTo(0);
    t.boolean('over_contract_ok').notNullable().defaultTo(false);
    t.boolean('over_deposit_cap_ok').notNullable().defaultTo(false);
    t.string('override_reason', 500);
    /** The random half of the customer's link; the link also carries an HMAC of it. */
    t.string('public_nonce', 43).notNullable();
    t.string('void_reason', 500);
    t.specificType('voided_at', 'DATETIME(3)');
    t.bigInteger('replaces_invoice_id').unsigned();
    t.specificType('sent_at', 'DATETIME(3)');
    t.integer('send_count').notNullable().defaultTo(0);
    t.string('created_by', 36);
    timestamps(t, knex);
    t.unique(['organization_id', 'number']);
    t.unique(['public_nonce']);
    t.index(['organization_id', 'job_id']);
    t.index(['organization_id', 'status', 'due_on']);
  });
  await knex.schema.createTable('invoice_lines', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('invoice_id').unsigned().notNullable().references('id').inTable('invoices').onDelete('CASCADE');
    t.integer('position').notNullable();
    /** contract (deposit, progress, final share), change_order, extra, retainage_release */
    t.string('kind', 20).notNullable();
    /** material, labour, other: what the company's tax mode looks at */
    t.string('category', 12).notNullable();
    t.string('description', 500).notNullable();
    t.decimal('quantity', 12, 3).notNullable().defaultTo(1);
    cents(t, 'unit_price_cents').notNullable();
    cents(t, 'amount_cents').notNullable();
    t.boolean('taxable').notNullable();
    t.bigInteger('change_order_id').unsigned().references('id').inTable('change_orders');
    t.index(['organization_id', 'invoice_id']);
  });
  await knex.schema.createTable('payments', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('invoice_id').unsigned().notNullable().references('id').inTable('invoices');
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs');
    t.bigInteger('customer_id').unsigned().notNullable().references('id').inTable('customers');
    /** card, check, cash, bank_transfer */
    t.string('method', 16).notNullable();
    /** What came in. */
    cents(t, 'amount_cents').notNullable();
    /** Of that, what went to the invoice; the rest is credit on the customer's account. */
    cents(t, 'applied_cents').notNullable();
    cents(t, 'credit_cents').notNullable().defaultTo(0);
    cents(t, 'refunded_cents').notNullable().defaultTo(0);
    t.date('received_on').notNullable();
    t.string('reference', 120);
    t.string('stripe_payment_intent', 64).unique();
    t.string('stripe_checkout_session', 80);
    t.string('recorded_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['organization_id', 'invoice_id']);
    t.index(['organization_id', 'job_id']);
  });
  await knex.schema.createTable('refunds', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('payment_id').unsigned().notNullable().references('id').inTable('payments');
    t.bigInteger('invoice_id').unsigned().notNullable().references('id').inTable('invoices');
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs');
    cents(t, 'amount_cents').notNullable();
    t.string('reason', 500);
    t.string('stripe_refund', 64).unique();
    t.date('refunded_on').notNullable();
    t.string('created_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['organization_id', 'job_id']);
  });
  await knex.schema.createTable('stripe_events', (t) => {
    t.string('id', 80).primary();
    t.string('organization_id', 36).references('id').inTable('organization').onDelete('CASCADE');
    t.string('type', 80).notNullable();
    t.bigInteger('invoice_id').unsigned();
    /** applied, ignored, or what went wrong */
    t.string('outcome', 200).notNullable();
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
  });
  await knex.schema.createTable('invoice_reminders', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('invoice_id').unsigned().notNullable().references('id').inTable('invoices').onDelete('CASCADE');
    /** Days from the due date (−3 = three days before). */
    t.integer('offset_days').notNullable();
    t.date('sent_on').notNullable();
    t.unique(['invoice_id', 'offset_days']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['invoice_reminders', 'stripe_events', 'refunds', 'payments', 'invoice_lines', 'invoices']) await knex.schema.dropTableIfExists(name);
}
