import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { AppError } from '../../lib/errors.ts';
import { CsvRecordTooLong, CsvTokenizer, type CsvRecord, type Delimiter } from '../../lib/csv/tokenizer.ts';
import { chooseMapping, guessMapping, headerSignature, requiredProblems, resolveColumns, type ImportKind, type Mapping } from '../../lib/csv/mapping.ts';
import { normaliseReceiptRow, normaliseTimesheetRow, type ReceiptLineValues, type RowContext, type TimesheetLineValues } from '../../lib/csv/normalise.ts';
import { OccurrenceCounter, receiptLineKey, timesheetLineKey } from '../../lib/csv/line-key.ts';
import { JobIndex, matchJob } from '../../lib/costs/job-match.ts';
import type { CostCategory } from '../../lib/costs/categories.ts';
import * as imports from '../repos/imports.ts';
import { workersByName } from '../repos/workers.ts';
import type { Actor } from '../http.ts';

const PREVIEW_ROWS = 10;
const SAMPLE_ROWS = 50;
const BATCH = 1000;

export const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');
/** A short digest for in-memory maps over 100,000 rows (the content itself may be long). */
const short = (text: string) => createHash('sha1').update(text).digest('base64');

/** SKUs compare without case, spaces or dashes: "PT-4X4-10" is "pt4x410". */
export const skuKey = (s: string) => s.toUpperCase().replace(/[\s-]+/g, '');

class NotUtf8 extends Error {}

/**
 * Records of the stored file, decoded as UTF-8 (a byte-order mark is dropped by the reader);
 * a file that is not valid UTF-8 is read again as Windows-1252, what older spreadsheet
 * exports on Windows write.
 */
async function* fileRecords(k: Knex, companyId: string, importId: number, encoding: 'utf-8' | 'windows-1252', delimiter: Delimiter | 'auto', onDelimiter: (d: Delimiter) => void): AsyncGenerator<CsvRecord> {
  const decoder = new TextDecoder(encoding, { fatal: encoding === 'utf-8' });
  const t = new CsvTokenizer({ delimiter });
  for await (const chunk of imports.readChunks(companyId, importId, k)) {
    let text: string;
    try { text = decoder.decode(chunk, { stream: true }); } catch { throw new NotUtf8(); }
    for (const r of t.push(text)) { if (t.delimiter) onDelimiter(t.delimiter); yield r; }
  }
  let tail: string;
  try { tail = decoder.decode(); } catch { throw new NotUtf8(); }
  for (const r of [...t.push(tail), ...t.end()]) { if (t.delimiter) onDelimiter(t.delimiter); yield r; }
}

export interface PreviewOptions {
  mapping?: Mapping | null;
  supplierId: number | null;
  /** a supplier named at upload that does not exist yet: created on commit */
  pendingSupplier: string | null;
}

/** Cells the bookkeeper corrected, by row number; they survive a re-read of the file. */
async function existingFixes(k: Knex, companyId: string, importId: number): Promise<Map<number, string[]>> {
  const rows = await k('import_lines').where({ organization_id: companyId, import_id: importId }).whereNotNull('fixed').select('row_number', 'fixed');
  return new Map(rows.map((r) => [Number(r.row_number), JSON.parse(r.fixed) as string[]]));
}

interface Lookups {
  jobs: JobIndex;
  items: Map<string, { id: number; category: CostCategory }>;
  workers: Map<string, { id: number }>;
}

async function lookups(k: Knex, companyId: string, kind: ImportKind): Promise<Lookups> {
  const jobs = new JobIndex((await k('jobs').where('organization_id', companyId).select('id', 'code')).map((r) => ({ id: Number(r.id), code: r.code as string })));
  const items = new Map<string, { id: number; category: CostCategory }>();
  if (kind === 'receipts') {
    for (const r of await k('price_book_items').where({ organization_id: companyId, active: true }).select('id', 'sku', 'category')) items.set(skuKey(r.sku), { id: Number(r.id), category: r.category });
  }
  const workers = kind === 'timesheet' ? await workersByName(companyId, k) : new Map();
  return { jobs, items, workers };
}

/**
 * Reads the stored file and writes one import line per row: good lines with their values,
 * matched job and line key, and every other row with its reason. Run inside the caller's
 * transaction; the previous lines of the import are replaced.
 */
export async function buildPreview(k: Knex, actor: Actor, importId: number, opts: PreviewOptions): Promise<void> {
  const imp = await imports.findImport(actor.companyId, importId, k);
  if (!imp) throw new Error(`import ${importId} vanished`);
  const fixes = await existingFixes(k, actor.companyId, importId);
  try {
    try {
      await parseInto(k, actor, imp.kind, importId, opts, fixes, 'utf-8');
    } catch (err) {
      if (!(err instanceof NotUtf8)) throw err;
      await parseInto(k, actor, imp.kind, importId, opts, fixes, 'windows-1252');
    }
  } catch (err) {
    if (err instanceof CsvRecordTooLong) throw new AppError('BAD_INPUT', err.message, { file: `Row ${err.row} is too long.` });
    throw err;
  }
}

async function parseInto(k: Knex, actor: Actor, kind: ImportKind, importId: number, opts: PreviewOptions, fixes: Map<number, string[]>, encoding: 'utf-8' | 'windows-1252'): Promise<void> {
  const companyId = actor.companyId;
  await imports.deleteLines(companyId, importId, k);
  let delimiter: Delimiter = ',';
  const records = fileRecords(k, companyId, importId, encoding, opts.mapping?.delimiter ?? 'auto', (d) => (delimiter = d));
  const blankRows: number[] = [];
  let headers: string[] | null = null;
  const pending: CsvRecord[] = [];
  // The header is the first row with text; rows before it are blank. (next() rather than a
  // for-await with break, which would close the generator before the rest is read.)
  for (let n = await records.next(); !n.done; n = await records.next()) {
    const r = n.value;
    if (!headers) {
      if (r.cells.every((c) => !c.trim())) { blankRows.push(r.row); continue; }
      headers = r.cells.map((c) => c.trim());
      continue;
    }
    pending.push(r);
    if (pending.length >= SAMPLE_ROWS) break;
  }
  headers ??= [];

  let mapping: Mapping;
  let source: 'given' | 'saved' | 'guessed';
  let supplierId = opts.supplierId;
  if (opts.mapping) {
    mapping = { ...opts.mapping, kind };
    source = 'given';
  } else {
    const saved = await imports.listMappings(companyId, kind, k);
    const chosen = chooseMapping(saved, headers, supplierId);
    if (chosen) {
      mapping = chosen.mapping;
      source = 'saved';
      // A mapping saved for exactly these headers also tells whose file this is.
      if (supplierId === null && !opts.pendingSupplier && chosen.headerSignature === headerSignature(headers)) supplierId = chosen.supplierId;
    } else {
      mapping = guessMapping(kind, headers, pending.map((r) => r.cells), 'auto');
      source = 'guessed';
    }
  }
  const columns = resolveColumns(mapping, headers);
  const problems = requiredProblems(mapping);
  for (const h of columns.missing) problems[`columns.${Object.entries(mapping.columns).find(([, v]) => v === h)?.[0] ?? h}`] = `This file has no column "${h}".`;
  if (!headers.length) problems.file = 'The file has no header row.';

  const summary: Record<string, unknown> = {
    encoding,
    delimiter,
    mappingSource: source,
    mappingProblems: problems,
    previewRows: pending.slice(0, PREVIEW_ROWS).map((r) => r.cells),
    pendingSupplier: opts.pendingSupplier,
  };
  const ready = Object.keys(problems).length === 0;
  if (ready) {
    // Line keys name the supplier, whether it was chosen, named at upload or recognised.
    const supplierName = opts.pendingSupplier ?? (supplierId ? ((await k('suppliers').where({ organization_id: companyId, id: supplierId }).first('name'))?.name ?? null) : null);
    const writer = new LineWriter(k, actor, kind, importId, { mapping, columns, headers }, await lookups(k, companyId, kind), supplierId, supplierName, fixes);
    for (const r of pending) await writer.add(r, blankRows);
    for await (const r of records) await writer.add(r, blankRows);
    await writer.flush();
  } else {
    // Drain the rest only to count the rows, so the screen can say how big the file is.
    let rows = pending.length;
    for await (const r of records) if (r.row) rows++;
    summary.unparsedRows = rows;
  }
  summary.delimiter = delimiter;
  summary.blankRows = blankRows.slice(0, 200);
  summary.blankCount = blankRows.length;
  await imports.updateImport(companyId, importId, { mapping, headers, supplier_id: supplierId, summary }, k);
}

type LineRow = Record<string, unknown>;

/** Normalises rows into import lines and writes them in batches, checking keys as it goes. */
class LineWriter {
  private batch: LineRow[] = [];
  private seenKeys = new Map<string, number>();
  private occurrences = new OccurrenceCounter();

  constructor(
    private k: Knex,
    private actor: Actor,
    private kind: ImportKind,
    private importId: number,
    private ctx: RowContext,
    private look: Lookups,
    private supplierId: number | null,
    private supplierName: string | null,
    private fixes: Map<number, string[]>,
  ) {}

  async add(r: CsvRecord, blankRows: number[]): Promise<void> {
    const fix = this.fixes.get(r.row);
    const cells = fix ?? r.cells;
    const base: LineRow = { organization_id: this.actor.companyId, import_id: this.importId, row_number: r.row, raw: JSON.stringify(r.cells), fixed: fix ? JSON.stringify(fix) : null };
    if (r.unterminated && !fix) {
      this.batch.push({ ...base, state: 'error', reason: 'a quote opened in this row is never closed, so the rest of the file ran into it' });
    } else {
      const out = this.kind === 'receipts' ? normaliseReceiptRow(cells, this.ctx) : normaliseTimesheetRow(cells, this.ctx);
      if (out.kind === 'blank') { blankRows.push(r.row); return; }
      if (out.kind === 'skipped' || out.kind === 'error') this.batch.push({ ...base, state: out.kind, reason: out.reason.slice(0, 500) });
      else this.batch.push({ ...base, ...(this.kind === 'receipts' ? this.receipt(out.values as ReceiptLineValues, r.row) : this.timesheet(out.values as TimesheetLineValues, r.row)) });
    }
    if (this.batch.length >= BATCH) await this.flush();
  }

  private keyed(material: string, row: number): { line_key: string; state: string; reason: string | null } {
    const key = sha256(material);
    const earlier = this.seenKeys.get(key);
    // Content keys carry an occurrence number, so only supplier + receipt + line keys repeat.
    if (earlier !== undefined) return { line_key: key, state: 'duplicate', reason: `the same receipt line is in row ${earlier} of this file` };
    this.seenKeys.set(key, row);
    return { line_key: key, state: 'ok', reason: null };
  }

  private receipt(v: ReceiptLineValues, row: number): LineRow {
    const supplier = v.supplierName ?? this.supplierName;
    const first = receiptLineKey(v, supplier, 0);
    // Supplier + receipt + line keys need no occurrence; identical content lines do.
    const material = first.startsWith('r|') ? first : receiptLineKey(v, supplier, this.occurrences.next(short(first)));
    const match = matchJob(
      [
        { field: 'jobRef', text: v.jobRef },
        { field: 'memo', text: v.memo },
        { field: 'description', text: v.description },
      ],
      this.look.jobs,
    );
    const item = v.sku ? this.look.items.get(skuKey(v.sku)) : undefined;
    return {
      ...this.keyed(material, row),
      line_date: v.date,
      supplier_name: v.supplierName,
      supplier_id: v.supplierName ? null : this.supplierId,
      receipt_number: v.receiptNumber,
      line_number: v.lineNumber,
      sku: v.sku,
      description: v.description,
      quantity: v.quantity,
      unit: v.unit,
      unit_price_cents: v.unitPriceCents,
      amount_cents: v.amountCents,
      tax_cents: v.taxCents,
      total_cents: v.totalCents,
      job_ref: v.jobRef,
      memo: v.memo,
      matched_job_id: match.jobId,
      match_reason: match.reason.slice(0, 200),
      category: item?.category ?? this.ctx.mapping.defaultCategory,
      price_book_item_id: item?.id ?? null,
    };
  }

  private timesheet(v: TimesheetLineValues, row: number): LineRow {
    const occurrence = this.occurrences.next(short(timesheetLineKey(v, 0)));
    const keyed = this.keyed(timesheetLineKey(v, occurrence), row);
    const worker = this.look.workers.get(v.workerName.trim().toLowerCase());
    const match = matchJob([{ field: 'jobRef', text: v.jobRef }], this.look.jobs);
    const problems = [!worker ? `no worker named "${v.workerName}" (add them on the Workers page)` : null, match.jobId === null ? `job "${v.jobRef}": ${match.reason}` : null].filter(Boolean);
    return {
      ...keyed,
      ...(problems.length ? { state: 'error', reason: problems.join('; ') } : {}),
      line_date: v.date,
      worker_name: v.workerName,
      worker_id: worker?.id ?? null,
      job_ref: v.jobRef,
      matched_job_id: match.jobId,
      match_reason: match.reason.slice(0, 200),
      hours: v.hours,
      task: v.task,
      memo: v.notes,
      category: 'labour',
    };
  }

  async flush(): Promise<void> {
    if (!this.batch.length) return;
    const rows = this.batch;
    this.batch = [];
    const fresh = rows.filter((r) => r.state === 'ok');
    const prior = await imports.committedKeys(this.actor.companyId, fresh.map((r) => r.line_key as string), this.k);
    for (const r of fresh) {
      const hit = prior.get(r.line_key as string);
      if (hit) { r.state = 'duplicate'; r.reason = `already imported: import #${hit.importId}, row ${hit.rowNumber}`; }
    }
    await imports.insertLines(rows, this.k);
  }
}
