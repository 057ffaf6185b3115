import type { Knex } from 'knex';
import { cents, percent, tenant, timestamps } from '../src/server/migration-helpers.ts';
import { TIME_TASKS } from '../src/lib/labour/tasks.ts';

// Crew members with their wage, and the hours they log on jobs by task. A time entry keeps
// the wage and burden it was costed with, so a later raise does not rewrite past jobs.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('workers', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.string('name', 160).notNullable();
    /** The member this worker is, when they sign in (a crew lead who also digs). */
    t.string('user_id', 36).references('id').inTable('user').onDelete('SET NULL');
    /** Whose crew they usually work on: their lead's picker lists them first. */
    t.string('crew_lead_user_id', 36).references('id').inTable('user').onDelete('SET NULL');
    /** Hourly wage. */
    cents(t, 'wage_cents').notNullable();
    t.boolean('active').notNullable().defaultTo(true);
    t.text('notes');
    timestamps(t, knex);
    t.unique(['organization_id', 'name']);
  });
  await knex.schema.createTable('time_entries', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.bigInteger('worker_id').unsigned().notNullable().references('id').inTable('workers');
    t.date('work_date').notNullable();
    /** hours, to the hundredth */
    t.decimal('hours', 5, 2).notNullable();
    t.enum('task', [...TIME_TASKS]).notNullable();
    t.text('notes');
    /** The wage and burden the cost was computed with. */
    cents(t, 'wage_cents').notNullable();
    percent(t, 'burden_pct').notNullable();
    cents(t, 'cost_cents').notNullable();
    t.string('entered_by', 36);
    t.bigInteger('import_line_id').unsigned();
    timestamps(t, knex);
    t.index(['organization_id', 'job_id', 'task']);
    t.index(['organization_id', 'work_date']);
    t.index(['organization_id', 'worker_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('time_entries');
  await knex.schema.dropTableIfExists('workers');
}
