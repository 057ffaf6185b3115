import type { Knex } from 'knex';
import { tenant } from '../src/server/migration-helpers.ts';

// Finished jobs the estimator leaves out of calibration by hand (a rock ledge, a crew short
// for a week), with the reason: for one measure ('labour:posts', 'waste:concrete') or the
// whole job ('job').
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('calibration_exclusions', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.string('scope', 40).notNullable();
    t.string('reason', 500).notNullable();
    t.string('created_by', 36);
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.unique(['organization_id', 'job_id', 'scope']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('calibration_exclusions');
}
