import type { Knex } from 'knex';

// better-auth's tables, with its camelCase column names. DATETIME(3), never TIMESTAMP:
// MariaDB can give a TIMESTAMP column ON UPDATE CURRENT_TIMESTAMP and rewrite expiries.
const dt = 'DATETIME(3)';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('user', (t) => {
    t.string('id', 36).primary();
    t.string('name', 255).notNullable();
    t.string('email', 255).notNullable().unique();
    t.boolean('emailVerified').notNullable().defaultTo(false);
    t.text('image');
    t.specificType('createdAt', dt).notNullable();
    t.specificType('updatedAt', dt).notNullable();
  });
  await knex.schema.createTable('session', (t) => {
    t.string('id', 36).primary();
    t.specificType('expiresAt', dt).notNullable();
    t.string('token', 255).notNullable().unique();
    t.specificType('createdAt', dt).notNullable();
    t.specificType('updatedAt', dt).notNullable();
    t.text('ipAddress');
    t.text('userAgent');
    t.string('userId', 36).notNullable().references('id').inTable('user').onDelete('CASCADE');
    t.text('activeOrganizationId');
    t.index(['userId']);
  });
  await knex.schema.createTable('account', (t) => {
    t.string('id', 36).primary();
    t.text('accountId').notNullable();
    t.text('providerId').notNullable();
    t.string('userId', 36).notNullable().references('id').inTable('user').onDelete('CASCADE');
    t.text('accessToken');
    t.text('refreshToken');
    t.text('idToken');
    t.specificType('accessTokenExpiresAt', dt);
    t.specificType('refreshTokenExpiresAt', dt);
    t.text('scope');
    t.text('password');
    t.specificType('createdAt', dt).notNullable();
    t.specificType('updatedAt', dt).notNullable();
    t.index(['userId']);
  });
  await knex.schema.createTable('verification', (t) => {
    t.string('id', 36).primary();
    t.string('identifier', 255).notNullable().index();
    t.text('value').notNullable();
    t.specificType('expiresAt', dt).notNullable();
    t.specificType('createdAt', dt).notNullable();
    t.specificType('updatedAt', dt).notNullable();
  });
  await knex.schema.createTable('organization', (t) => {
    t.string('id', 36).primary();
    t.string('name', 255).notNullable();
    t.string('slug', 255).notNullable().unique();
    t.text('logo');
    t.specificType('createdAt', dt).notNullable();
    t.text('metadata');
  });
  await knex.schema.createTable('member', (t) => {
    t.string('id', 36).primary();
    t.string('organizationId', 36).notNullable().references('id').inTable('organization').onDelete('CASCADE');
    t.string('userId', 36).notNullable().references('id').inTable('user').onDelete('CASCADE');
    t.string('role', 64).notNullable();
    t.specificType('createdAt', dt).notNullable();
    t.unique(['organizationId', 'userId']);
    t.index(['userId']);
  });
  await knex.schema.createTable('invitation', (t) => {
    t.string('id', 36).primary();
    t.string('organizationId', 36).notNullable().references('id').inTable('organization').onDelete('CASCADE');
    t.string('email', 255).notNullable();
    t.string('role', 64);
    t.string('status', 32).notNullable();
    t.specificType('expiresAt', dt).notNullable();
    t.specificType('createdAt', dt).notNullable();
    t.string('inviterId', 36).notNullable().references('id').inTable('user').onDelete('CASCADE');
    t.index(['organizationId']);
    t.index(['email']);
  });
  await knex.schema.createTable('rateLimit', (t) => {
    t.string('id', 36).primary();
    t.string('key', 255).notNullable().unique();
    t.integer('count').notNullable();
    t.bigInteger('lastRequest').notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['rateLimit', 'invitation', 'member', 'organization', 'verification', 'account', 'session', 'user']) {
    await knex.schema.dropTableIfExists(name);
  }
}
