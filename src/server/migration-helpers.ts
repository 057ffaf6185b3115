import type { Knex } from 'knex';

/** DATETIME(3) with a default of now: no TIMESTAMP, so MariaDB never adds ON UPDATE. */
export function timestamps(t: Knex.CreateTableBuilder, k: Knex): void {
  t.specificType('created_at', 'DATETIME(3)').notNullable().defaultTo(k.raw('CURRENT_TIMESTAMP(3)'));
  t.specificType('updated_at', 'DATETIME(3)').notNullable().defaultTo(k.raw('CURRENT_TIMESTAMP(3)'));
}

/** organization_id, required and indexed, referencing the better-auth organization. */
export function tenant(t: Knex.CreateTableBuilder): void {
  t.string('organization_id', 36).notNullable().references('id').inTable('organization').onDelete('CASCADE');
}

/** A money column in minor units of the company's currency. */
export function cents(t: Knex.CreateTableBuilder, name: string): Knex.ColumnBuilder {
  return t.bigInteger(name);
}

/** A percentage such as 8.875 (not 0.08875). */
export function percent(t: Knex.CreateTableBuilder, name: string): Knex.ColumnBuilder {
  return t.decimal(name, 7, 4);
}
