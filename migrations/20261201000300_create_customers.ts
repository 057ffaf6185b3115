import type { Knex } from 'knex';
import { tenant, timestamps } from '../src/server/migration-helpers.ts';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('customers', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.string('name', 200).notNullable();
    t.string('email', 255);
    t.string('phone', 40);
    t.string('billing_line1', 200);
    t.string('billing_line2', 200);
    t.string('billing_city', 120);
    t.string('billing_region', 60);
    t.string('billing_postal', 20);
    t.string('site_line1', 200);
    t.string('site_city', 120);
    t.string('site_region', 60);
    t.string('site_postal', 20);
    t.text('notes');
    timestamps(t, knex);
    t.index(['organization_id', 'name']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('customers');
}
