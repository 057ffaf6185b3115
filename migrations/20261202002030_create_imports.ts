import type { Knex } from 'knex';
import { cents, tenant, timestamps } from '../src/server/migration-helpers.ts';
import { COST_CATEGORIES } from '../src/lib/costs/categories.ts';
import { IMPORT_KINDS } from '../src/lib/csv/mapping.ts';

// CSV imports (supplier receipts and timesheets): the original file in chunks (app servers
// keep no files), every row with its raw cells, and the column mapping saved per supplier.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('imports', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.enum('kind', [...IMPORT_KINDS]).notNullable();
    t.string('file_name', 255).notNullable();
    t.specificType('file_sha256', 'CHAR(64)').notNullable();
    /** bytes */
    t.bigInteger('file_bytes').notNullable();
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('SET NULL');
    t.json('mapping');
    t.json('headers');
    /** preview → committed, or discarded */
    t.string('status', 16).notNullable().defaultTo('preview');
    /** rows, lines, errors, skipped, blank, duplicates, totals: the preview's counts */
    t.json('summary');
    t.string('uploaded_by', 36).notNullable();
    t.specificType('uploaded_at', 'DATETIME(3)').notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.string('committed_by', 36);
    t.specificType('committed_at', 'DATETIME(3)');
    t.json('commit_summary');
    timestamps(t, knex);
    t.index(['organization_id', 'file_sha256']);
    t.index(['organization_id', 'status', 'id']);
  });
  await knex.schema.createTable('import_chunks', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('import_id').unsigned().notNullable().references('id').inTable('imports').onDelete('CASCADE');
    t.integer('seq').notNullable();
    t.specificType('data', 'MEDIUMBLOB').notNullable();
    t.unique(['import_id', 'seq']);
  });
  await knex.schema.createTable('import_lines', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.bigInteger('import_id').unsigned().notNullable().references('id').inTable('imports').onDelete('CASCADE');
    /** The row a spreadsheet shows (the header is row 1). */
    t.integer('row_number').notNullable();
    /** The row's cells exactly as the file had them (JSON array of strings). */
    t.text('raw', 'mediumtext').notNullable();
    /** Cells the bookkeeper corrected in the preview, when any. */
    t.text('fixed', 'mediumtext');
    /** ok, error, skipped (total or repeated header), committed, duplicate */
    t.string('state', 12).notNullable();
    t.string('reason', 500);
    /** sha256 of what makes the line the same line (see lib/csv/line-key.ts). */
    t.specificType('line_key', 'CHAR(64)');
    /** Set when committed: the unique guard against importing a line twice. */
    t.specificType('dedupe_key', 'CHAR(64)');
    t.date('line_date');
    t.string('supplier_name', 160);
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('SET NULL');
    t.string('receipt_number', 60);
    t.string('line_number', 20);
    t.string('sku', 80);
    t.string('description', 500);
    t.decimal('quantity', 14, 4);
    t.string('unit', 20);
    cents(t, 'unit_price_cents');
    cents(t, 'amount_cents');
    cents(t, 'tax_cents');
    cents(t, 'total_cents');
    t.string('job_ref', 100);
    t.string('memo', 500);
    t.bigInteger('matched_job_id').unsigned().references('id').inTable('jobs').onDelete('SET NULL');
    t.string('match_reason', 200);
    t.enum('category', [...COST_CATEGORIES]);
    t.bigInteger('price_book_item_id').unsigned().references('id').inTable('price_book_items').onDelete('SET NULL');
    /** unmatched, job, split, overhead (receipt lines, once committed) */
    t.string('allocation', 12);
    t.string('worker_name', 160);
    t.bigInteger('worker_id').unsigned().references('id').inTable('workers').onDelete('SET NULL');
    t.decimal('hours', 5, 2);
    t.string('task', 20);
    t.index(['import_id', 'row_number']);
    t.index(['organization_id', 'allocation']);
    t.index(['organization_id', 'line_key']);
    t.unique(['organization_id', 'dedupe_key']);
  });
  await knex.schema.createTable('import_mappings', (t) => {
    t.bigIncrements('id');
    tenant(t);
    t.enum('kind', [...IMPORT_KINDS]).notNullable();
    t.bigInteger('supplier_id').unsigned().references('id').inTable('suppliers').onDelete('CASCADE');
    /** s:<supplier id>, or h:<hash of the headers> for a mapping saved without a supplier */
    t.string('mapping_key', 80).notNullable();
    t.json('mapping').notNullable();
    t.json('headers').notNullable();
    t.text('header_signature').notNullable();
    t.string('updated_by', 36);
    timestamps(t, knex);
    t.unique(['organization_id', 'kind', 'mapping_key']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['import_mappings', 'import_lines', 'import_chunks', 'imports']) await knex.schema.dropTableIfExists(name);
}
