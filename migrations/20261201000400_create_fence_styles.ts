import type { Knex } from 'knex';
import { tenant, timestamps } from '../src/server/migration-helpers.ts';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('fence_styles', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.string('name', 120).notNullable();
    /** wood_privacy, split_rail, wire_panel, chain_link, vinyl, ornamental, picket */
    t.string('kind', 40).notNullable();
    t.text('description');
    /** The style's recipe (posts, rails, infill, rates) as JSON; the bids feature reads it. */
    t.json('recipe');
    t.boolean('active').notNullable().defaultTo(true);
    timestamps(t, knex);
    t.unique(['organization_id', 'name']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('fence_styles');
}
