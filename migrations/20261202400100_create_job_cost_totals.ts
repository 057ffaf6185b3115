import type { Knex } from 'knex';
import { tenant } from '../src/server/migration-helpers.ts';

/**
 * Each job's actual cost by category, kept in step with its three sources (cost lines, crew
 * hours, priced rentals) by triggers, so the margin reports read a few rows per job instead
 * of summing ten years of lines on every request. A trigger runs in the transaction of the
 * write that fires it: the totals commit, or roll back, with the lines. Deleting a job drops
 * its totals by the foreign key (MariaDB fires no trigger for a cascade, and the cascade is
 * what removes or unassigns that job's lines).
 */
const SOURCES = [
  { table: 'cost_lines', category: 'X.category', amount: 'X.amount_cents', when: 'X.job_id IS NOT NULL' },
  { table: 'time_entries', category: "'labour'", amount: 'IFNULL(X.cost_cents, 0)', when: 'TRUE' },
  { table: 'rentals', category: "'rental'", amount: 'IFNULL(X.cost_cents, 0)', when: 'X.cost_cents IS NOT NULL' },
] as const;

const add = (s: (typeof SOURCES)[number], row: 'NEW' | 'OLD', sign: 1 | -1) => {
  const v = (expr: string) => expr.replaceAll('X.', `${row}.`);
  return `IF ${v(s.when)} THEN
    INSERT INTO job_cost_totals (organization_id, job_id, category, amount_cents, entries)
    VALUES (${row}.organization_id, ${row}.job_id, ${v(s.category)}, ${sign} * ${v(s.amount)}, ${sign})
    ON DUPLICATE KEY UPDATE amount_cents = amount_cents + VALUES(amount_cents), entries = entries + VALUES(entries);
  END IF;`;
};

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('job_cost_totals', (t) => {
    tenant(t);
    t.bigInteger('job_id').unsigned().notNullable().references('id').inTable('jobs').onDelete('CASCADE');
    t.string('category', 20).notNullable();
    t.bigInteger('amount_cents').notNullable().defaultTo(0);
    /** how many source rows make up the amount */
    t.integer('entries').notNullable().defaultTo(0);
    t.primary(['job_id', 'category']);
    t.index(['organization_id', 'job_id', 'category', 'amount_cents'], 'job_cost_totals_report_idx');
  });
  // Existing rows, once, source by source on their covering indexes (the app is stopped
  // while migrations run, so nothing is written between this and the triggers).
  for (const s of SOURCES) {
    const x = (expr: string) => expr.replaceAll('X.', '');
    await knex.raw(`
      INSERT INTO job_cost_totals (organization_id, job_id, category, amount_cents, entries)
      SELECT organization_id, job_id, ${x(s.category)}, SUM(${x(s.amount)}), COUNT(*) FROM ${s.table}
       WHERE ${x(s.when)} GROUP BY organization_id, job_id, ${x(s.category)}
      ON DUPLICATE KEY UPDATE amount_cents = job_cost_totals.amount_cents + VALUES(amount_cents), entries = job_cost_totals.entries + VALUES(entries)`);
  }
  for (const s of SOURCES) {
    await knex.raw(`CREATE TRIGGER ${s.table}_totals_ai AFTER INSERT ON ${s.table} FOR EACH ROW BEGIN ${add(s, 'NEW', 1)} END`);
    await knex.raw(`CREATE TRIGGER ${s.table}_totals_ad AFTER DELETE ON ${s.table} FOR EACH ROW BEGIN ${add(s, 'OLD', -1)} END`);
    await knex.raw(`CREATE TRIGGER ${s.table}_totals_au AFTER UPDATE ON ${s.table} FOR EACH ROW BEGIN ${add(s, 'OLD', -1)} ${add(s, 'NEW', 1)} END`);
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const s of SOURCES) for (const w of ['ai', 'ad', 'au']) await knex.raw(`DROP TRIGGER IF EXISTS ${s.table}_totals_${w}`);
  await knex.schema.dropTableIfExists('job_cost_totals');
}
