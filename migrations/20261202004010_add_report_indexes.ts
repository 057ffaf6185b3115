import type { Knex } from 'knex';

// Covering indexes for the margin reports' one statement: each cost source is summed by job
// (and category) from its index alone, without reading the rows.
const INDEXES: [table: string, columns: string[], name: string][] = [
  ['cost_lines', ['organization_id', 'job_id', 'category', 'amount_cents'], 'cost_lines_report_idx'],
  ['time_entries', ['organization_id', 'job_id', 'cost_cents'], 'time_entries_report_idx'],
  ['rentals', ['organization_id', 'job_id', 'cost_cents'], 'rentals_report_idx'],
  ['job_estimates', ['organization_id', 'job_id', 'category', 'amount_cents'], 'job_estimates_report_idx'],
  ['invoices', ['organization_id', 'status', 'job_id', 'contract_billed_cents', 'paid_cents'], 'invoices_report_idx'],
  ['bids', ['organization_id', 'status', 'job_id', 'total_length_ft'], 'bids_report_idx'],
];

export async function up(knex: Knex): Promise<void> {
  for (const [table, columns, name] of INDEXES) await knex.schema.alterTable(table, (t) => { t.index(columns, name); });
}

export async function down(knex: Knex): Promise<void> {
  for (const [table, , name] of INDEXES) await knex.schema.alterTable(table, (t) => { t.dropIndex([], name); });
}
