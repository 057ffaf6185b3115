import type { Knex } from 'knex';
import { tenant, timestamps } from '../src/server/migration-helpers.ts';

// The pre-dig checklist of a job: the locate ticket, the permit, HOA approval, the property
// line, and the owner's written override when a job must build without a current ticket.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('job_checklists', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.string('locate_ticket_number', 60);
    t.date('locate_called_on');
    /** computed from the company's rules when saved */
    t.date('locate_dig_from');
    t.date('locate_expires_on');
    t.enum('permit_required', ['yes', 'no', 'unknown']).notNullable().defaultTo('unknown');
    t.string('permit_number', 60);
    t.boolean('hoa_required').notNullable().defaultTo(false);
    t.date('hoa_approved_on');
    t.boolean('property_line_confirmed').notNullable().defaultTo(false);
    t.string('property_line_note', 500);
    t.text('override_reason');
    t.string('override_by', 36);
    t.specificType('override_at', 'DATETIME(3)');
    t.string('updated_by', 36);
    timestamps(t, knex);
    t.unique(['organization_id', 'job_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('job_checklists');
}
