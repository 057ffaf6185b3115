import type { Knex } from 'knex';

// An import's lines are counted by state (with their amounts and how many matched a job) on
// every preview and commit: a covering index makes that an index read instead of a pass over
// 100,000 wide rows. The index on line_key is dropped: lines are looked up by dedupe_key (the
// unique guard of committed lines), never by line_key, and it cost every insert.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('import_lines', (t) => {
    t.index(['import_id', 'state', 'matched_job_id', 'total_cents'], 'import_lines_state_idx');
    t.dropIndex(['organization_id', 'line_key']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('import_lines', (t) => {
    t.index(['organization_id', 'line_key']);
    t.dropIndex([], 'import_lines_state_idx');
  });
}
