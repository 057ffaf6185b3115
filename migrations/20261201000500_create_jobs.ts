import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('jobs', (t) => {
    t.bigIncrements('id');
    tenant(t);
    /** Human job code such as J-0142, unique within the company. */
    t.string('code', 20).notNullable();
    t.string('title', 200).notNullable();
    t.bigInteger('customer_id').unsigned().notNullable().references('id').inTable('customers');
    t.bigInteger('fence_style_id').unsigned().references('id').inTable('fence_styles');
    t.string('estimator_user_id', 36).references('id').inTable('user').onDelete('SET NULL');
    t.string('crew_lead_user_id', 36).references('id').inTable('user').onDelete('SET NULL');
    t.string('status', 20).notNullable().defaultTo('lead');
    t.boolean('commercial').notNullable().defaultTo(false);
    t.string('site_line1', 200);
    t.string('site_city', 120);
    t.string('site_region', 60);
    t.string('site_postal', 20);
    t.date('lead_date');
    t.date('measure_date');
    t.date('bid_date');
    t.date('decided_date');
    t.date('start_date');
    t.date('completed_date');
    t.date('closed_date');
    cents(t, 'contract_cents');
    t.text('notes');
    t.string('created_by', 36);
    timestamps(t, knex);
    t.unique(['organization_id', 'code']);
    t.index(['organization_id', 'status']);
    t.index(['organization_id', 'customer_id']);
    t.index(['organization_id', 'crew_lead_user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('jobs');
}
