import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('outbox', (t) => {
    t.bigIncrements('id');
    t.string('organization_id', 36).references('id').inTable('organization').onDelete('CASCADE');
    t.string('to_address', 255).notNullable();
    t.string('subject', 300).notNullable();
    t.text('body_text', 'mediumtext').notNullable();
    t.text('body_html', 'mediumtext').notNullable();
    t.text('attachments').notNullable();
    t.string('dedupe_key', 191).unique();
    /** pending → sending → sent, or failed after the last attempt */
    t.string('status', 16).notNullable();
    t.integer('attempts').notNullable().defaultTo(0);
    t.specificType('next_attempt_at', 'DATETIME(3)').notNullable();
    t.string('locked_by', 100);
    t.specificType('locked_until', 'DATETIME(3)');
    t.specificType('sent_at', 'DATETIME(3)');
    t.string('message_id', 255);
    t.string('smtp_response', 255);
    t.text('last_error');
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['status', 'next_attempt_at']);
  });
  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id');
    t.string('organization_id', 36).notNullable().references('id').inTable('organization').onDelete('CASCADE');
    t.string('user_id', 36);
    t.string('entity', 40).notNullable();
    t.string('entity_id', 64).notNullable();
    t.string('action', 40).notNullable();
    t.json('detail');
    t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['organization_id', 'entity', 'entity_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('audit_log');
  await knex.schema.dropTableIfExists('outbox');
}
