import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('change_orders', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    /** 1, 2, 3 ... within the job (CO-1). */
    t.integer('number').notNullable();
    t.string('description', 500).notNullable();
    /** What the customer pays for it. */
    cents(t, 'price_cents').notNullable();
    /** Estimated cost by category as { material: cents, ... }; copied to job_estimates on approval. */
    t.json('cost_estimate').notNullable();
    /** proposed → approved or declined */
    t.string('status', 12).notNullable().defaultTo('proposed');
    t.date('approved_on');
    t.string('approved_by_name', 200);
    t.string('created_by', 36);
    timestamps(t, knex);
    t.unique(['organization_id', 'job_id', 'number']);
    t.index(['organization_id', 'job_id', 'status']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('change_orders');
}
