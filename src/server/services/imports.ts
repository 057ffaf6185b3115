import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { mappingSchema, resolveColumns, type ImportKind, type Mapping } from '../../lib/csv/mapping.ts';
import { normaliseReceiptRow, normaliseTimesheetRow } from '../../lib/csv/normalise.ts';
import { ROW_ERRORS_SHOWN, type CommitSummary, type ImportCounts, type ImportDetail, type ImportLine, type ImportLinesQuery, type ImportListItem } from '../../lib/csv/imports.ts';
import { fieldErrors } from '../../lib/errors.ts';
import * as imports from '../repos/imports.ts';
import { findSupplier, findSupplierByName } from '../repos/suppliers.ts';
import { audit } from '../repos/audit.ts';
import { buildPreview } from './import-preview.ts';
import { receiveUpload } from './import-upload.ts';
import { commitImportWith, type CommitOptions } from './import-commit.ts';
import { createHash } from 'node:crypto';
import { CHUNK_BYTES } from '../repos/imports.ts';

/** A supplier named at upload or re-map: an id of this company, or a name (created on commit). */
async function resolveSupplier(k: Knex, actor: Actor, value: number | string | null | undefined): Promise<{ supplierId: number | null; pendingSupplier: string | null }> {
  if (value === null || value === undefined || value === '') return { supplierId: null, pendingSupplier: null };
  if (typeof value === 'number' || /^\d+$/.test(value)) {
    const s = await findSupplier(actor.companyId, Number(value), k);
    if (!s) throw new AppError('BAD_INPUT', 'Choose a supplier of this company.', { supplier: 'Choose a supplier from the list.' });
    return { supplierId: s.id, pendingSupplier: null };
  }
  const name = value.trim().slice(0, 160);
  const s = await findSupplierByName(actor.companyId, name, k);
  return s ? { supplierId: s.id, pendingSupplier: null } : { supplierId: null, pendingSupplier: name };
}

function parseMappingField(raw: string | undefined, kind: ImportKind): Mapping | null {
  if (!raw || !raw.trim()) return null;
  let value: unknown;
  try { value = JSON.parse(raw); } catch { throw new AppError('BAD_INPUT', 'The mapping is not valid JSON.', { mapping: 'Not valid JSON.' }); }
  const parsed = mappingSchema.safeParse({ kind, ...(value as object) });
  if (!parsed.success) throw new AppError('BAD_INPUT', 'The column mapping needs attention.', Object.fromEntries(Object.entries(fieldErrors(parsed.error.issues)).map(([key, v]) => [`mapping.${key}`, v])));
  return parsed.data;
}

async function previewInTransaction(k: Knex, actor: Actor, importId: number, opts: { mapping: Mapping | null; supplierId: number | null; pendingSupplier: string | null }): Promise<void> {
  await k.transaction(async (trx) => {
    await buildPreview(trx, actor, importId, opts);
    await imports.updateImport(actor.companyId, importId, { status: 'preview' }, trx);
  });
}

/** POST /api/receipts/imports: the upload, stored as it streams in, then previewed. */
export async function uploadImport(actor: Actor, request: Request, kind: ImportKind): Promise<ImportDetail> {
  const { importId, fields } = await receiveUpload(actor, request, kind);
  try {
    const mapping = parseMappingField(fields.mapping, kind);
    const supplier = await resolveSupplier(db(), actor, fields.supplier);
    await previewInTransaction(db(), actor, importId, { mapping, ...supplier });
  } catch (err) {
    await imports.deleteImport(actor.companyId, importId);
    throw err;
  }
  return getImport(actor, importId, kind);
}

/** The same import path for text already in hand (the demo seed, scripts). */
export async function importText(k: Knex, actor: Actor, input: { kind: ImportKind; fileName: string; text: string; supplier?: string | number | null; mapping?: Mapping | null }): Promise<number> {
  const buf = Buffer.from(input.text, 'utf8');
  const id = await imports.insertImport(actor.companyId, { kind: input.kind, fileName: input.fileName, uploadedBy: actor.userId }, k);
  for (let seq = 0, at = 0; at < buf.length; seq++, at += CHUNK_BYTES) await imports.writeChunk(actor.companyId, id, seq, buf.subarray(at, at + CHUNK_BYTES), k);
  await imports.updateImport(actor.companyId, id, { file_sha256: createHash('sha256').update(buf).digest('hex'), file_bytes: buf.length }, k);
  await previewInTransaction(k, actor, id, { mapping: input.mapping ?? null, ...(await resolveSupplier(k, actor, input.supplier)) });
  return id;
}

async function visibleImport(k: Knex, actor: Actor, id: number, kind?: ImportKind): Promise<imports.ImportRow> {
  const imp = await imports.findImport(actor.companyId, id, k);
  if (!imp || imp.status === 'uploading' || imp.status === 'discarded' || (kind && imp.kind !== kind)) throw notFound('That import');
  return imp;
}

function counts(imp: imports.ImportRow, c: imports.LineCounts): ImportCounts {
  const s = (k: string) => c.byState[k] ?? 0;
  return {
    rows: c.rows + Number(imp.summary.blankCount ?? 0),
    lines: s('ok') + s('committed'),
    errors: s('error'),
    skipped: s('skipped'),
    blank: Number(imp.summary.blankCount ?? 0),
    duplicates: s('duplicate'),
    committed: s('committed'),
    matched: c.matched,
    unmatched: c.unmatched,
    goodCents: c.okCents + c.committedCents,
    committedCents: c.committedCents,
  };
}

export async function getImport(actor: Actor, id: number, kind?: ImportKind, k: Knex = db()): Promise<ImportDetail> {
  const imp = await visibleImport(k, actor, id, kind);
  const c = await imports.countLines(actor.companyId, id, k);
  const errorCount = c.byState.error ?? 0;
  const errorRows = errorCount
    ? await k('import_lines').where({ organization_id: actor.companyId, import_id: id, state: 'error' }).orderBy('row_number').limit(ROW_ERRORS_SHOWN).select('row_number', 'reason')
    : [];
  const s = imp.summary;
  return {
    id: imp.id,
    kind: imp.kind,
    fileName: imp.fileName,
    fileBytes: imp.fileBytes,
    fileSha256: imp.fileSha256,
    status: imp.status as 'preview' | 'committed',
    supplierId: imp.supplierId,
    supplierName: imp.supplierName ?? (s.pendingSupplier as string | null) ?? null,
    mapping: imp.mapping,
    mappingSource: (s.mappingSource as ImportDetail['mappingSource']) ?? null,
    mappingProblems: (s.mappingProblems as Record<string, string>) ?? {},
    headers: imp.headers ?? [],
    delimiter: (s.delimiter as string) ?? ',',
    encoding: (s.encoding as string) ?? 'utf-8',
    previewRows: (s.previewRows as string[][]) ?? [],
    blankRows: (s.blankRows as number[]) ?? [],
    counts: counts(imp, c),
    rowErrors: { total: errorCount, rows: errorRows.map((r) => ({ rowNumber: Number(r.row_number), reason: String(r.reason ?? '') })) },
    duplicateOf: imp.status === 'preview' ? await imports.committedWithHash(actor.companyId, imp.fileSha256, imp.id, k) : null,
    uploadedByName: imp.uploadedByName,
    uploadedAt: imp.uploadedAt,
    committedByName: imp.committedByName,
    committedAt: imp.committedAt,
    commitSummary: imp.commitSummary as CommitSummary | null,
  };
}


export async function listImports(actor: Actor, kind: ImportKind): Promise<ImportListItem[]> {
  const rows = await imports.listImports(actor.companyId, { kind, limit: 500 });
  if (!rows.length) return [];
  const agg = await db()('import_lines')
    .where('organization_id', actor.companyId)
    .whereIn('import_id', rows.map((r) => r.id))
    .groupBy('import_id')
    .select('import_id')
    .select(db().raw(`SUM(state IN ('ok','committed')) AS n_lines, SUM(state = 'error') AS n_errors, SUM(state = 'duplicate') AS n_dups,
      SUM(state = 'committed' AND allocation = 'unmatched') AS n_unmatched, COALESCE(SUM(CASE WHEN state IN ('ok','committed') THEN total_cents END), 0) AS cents,
      COALESCE(SUM(CASE WHEN state IN ('ok','committed') THEN hours END), 0) AS n_hours`));
  const by = new Map(agg.map((a) => [Number(a.import_id), a]));
  return rows.map((r) => {
    const a = by.get(r.id);
    return {
      id: r.id,
      kind: r.kind,
      fileName: r.fileName,
      fileBytes: r.fileBytes,
      status: r.status,
      supplierName: r.supplierName ?? (r.summary.pendingSupplier as string | null) ?? null,
      uploadedByName: r.uploadedByName,
      uploadedAt: r.uploadedAt,
      committedAt: r.committedAt,
      lines: Number(a?.n_lines ?? 0),
      errors: Number(a?.n_errors ?? 0),
      duplicates: Number(a?.n_dups ?? 0),
      unmatched: Number(a?.n_unmatched ?? 0),
      amountCents: toInt(a?.cents ?? 0),
      hours: Number(a?.n_hours ?? 0),
    };
  });
}

const parseJson = (v: unknown) => (v == null ? null : typeof v === 'string' ? JSON.parse(v) : v);

export function lineFromRow(r: Record<string, unknown>): ImportLine {
  const n = (v: unknown) => (v === null || v === undefined ? null : toInt(v));
  return {
    id: Number(r.id),
    importId: Number(r.import_id),
    rowNumber: Number(r.row_number),
    state: r.state as ImportLine['state'],
    reason: (r.reason as string) ?? null,
    raw: parseJson(r.raw) ?? [],
    fixed: parseJson(r.fixed),
    date: (r.line_date as string) ?? null,
    supplierName: (r.supplier_name as string) ?? (r.supplier_label as string) ?? null,
    receiptNumber: (r.receipt_number as string) ?? null,
    lineNumber: (r.line_number as string) ?? null,
    sku: (r.sku as string) ?? null,
    description: (r.description as string) ?? null,
    quantity: r.quantity == null ? null : String(Number(r.quantity)),
    unit: (r.unit as string) ?? null,
    unitPriceCents: n(r.unit_price_cents),
    amountCents: n(r.amount_cents),
    taxCents: n(r.tax_cents),
    totalCents: n(r.total_cents),
    jobRef: (r.job_ref as string) ?? null,
    memo: (r.memo as string) ?? null,
    matchedJobId: r.matched_job_id == null ? null : Number(r.matched_job_id),
    matchedJobCode: (r.matched_job_code as string) ?? null,
    matchReason: (r.match_reason as string) ?? null,
    category: (r.category as ImportLine['category']) ?? null,
    allocation: (r.allocation as ImportLine['allocation']) ?? null,
    workerName: (r.worker_name as string) ?? null,
    hours: r.hours == null ? null : Number(r.hours),
    task: (r.task as string) ?? null,
  };
}

export function linesQuery(k: Knex, companyId: string) {
  return k('import_lines as l')
    .leftJoin('jobs as j', function () { this.on('j.id', 'l.matched_job_id').andOn('j.organization_id', 'l.organization_id'); })
    .leftJoin('suppliers as s', function () { this.on('s.id', 'l.supplier_id').andOn('s.organization_id', 'l.organization_id'); })
    .where('l.organization_id', companyId)
    .select('l.*', 'j.code as matched_job_code', 's.name as supplier_label');
}

/** How each committed receipt line is allocated now: its cost lines. */
export async function partsOf(companyId: string, lineIds: number[], q: Knex = db()) {
  if (!lineIds.length) return new Map<number, ImportLine['parts']>();
  const rows = await q('cost_lines as c')
    .leftJoin('jobs as j', function () { this.on('j.id', 'c.job_id').andOn('j.organization_id', 'c.organization_id'); })
    .where('c.organization_id', companyId)
    .whereIn('c.import_line_id', lineIds)
    .orderBy('c.id')
    .select('c.import_line_id', 'c.job_id', 'j.code', 'c.overhead', 'c.category', 'c.amount_cents');
  const out = new Map<number, NonNullable<ImportLine['parts']>>();
  for (const r of rows) {
    const list = out.get(Number(r.import_line_id)) ?? [];
    list.push({ jobId: r.job_id == null ? null : Number(r.job_id), jobCode: r.code ?? null, overhead: Boolean(r.overhead), category: r.category, amountCents: toInt(r.amount_cents) });
    out.set(Number(r.import_line_id), list);
  }
  return out;
}

export async function listImportLines(actor: Actor, id: number, query: ImportLinesQuery, kind?: ImportKind): Promise<{ items: ImportLine[]; total: number }> {
  await visibleImport(db(), actor, id, kind);
  const b = linesQuery(db(), actor.companyId).andWhere('l.import_id', id);
  if (query.state === 'problems') b.whereIn('l.state', ['error', 'skipped', 'duplicate']);
  else if (query.state !== 'all') b.andWhere('l.state', query.state);
  if (query.allocation !== 'all') b.andWhere('l.allocation', query.allocation);
  const [{ n }] = await b.clone().clearSelect().count({ n: '*' });
  const rows = await b.orderBy('l.row_number').limit(query.pageSize).offset((query.page - 1) * query.pageSize);
  const items = rows.map(lineFromRow);
  const parts = await partsOf(actor.companyId, items.filter((i) => i.allocation).map((i) => i.id));
  for (const i of items) if (i.allocation) i.parts = parts.get(i.id) ?? [];
  return { items, total: Number(n) };
}

async function previewOnly(actor: Actor, id: number, kind?: ImportKind, k: Knex = db()): Promise<imports.ImportRow> {
  const imp = await visibleImport(k, actor, id, kind);
  if (imp.status !== 'preview') throw new AppError('CONFLICT', `Import #${id} is already committed; its rows can no longer change.`);
  return imp;
}

/** Reads the stored file again with another mapping or supplier. */
export async function remapImport(actor: Actor, id: number, input: { mapping: Mapping; supplier?: number | string | null }, kind?: ImportKind): Promise<ImportDetail> {
  const imp = await previewOnly(actor, id, kind);
  const supplier = input.supplier === undefined ? { supplierId: imp.supplierId, pendingSupplier: (imp.summary.pendingSupplier as string | null) ?? null } : await resolveSupplier(db(), actor, input.supplier);
  await previewInTransaction(db(), actor, id, { mapping: { ...input.mapping, kind: imp.kind }, ...supplier });
  return getImport(actor, id, kind);
}

/** The bookkeeper corrects a flagged row's cells in the preview; the row is read again. */
export async function fixImportLine(actor: Actor, id: number, lineId: number, cells: string[], kind?: ImportKind): Promise<ImportLine> {
  const imp = await previewOnly(actor, id, kind);
  const line = await db()('import_lines').where({ organization_id: actor.companyId, import_id: id, id: lineId }).first();
  if (!line) throw notFound('That row');
  if (!imp.mapping || Object.keys((imp.summary.mappingProblems as object) ?? {}).length) throw new AppError('RULE_BROKEN', 'Map the columns first.');
  await db().transaction(async (trx) => {
    // The fix is kept on the line and the whole file is read again, so keys, duplicates
    // and matches stay consistent with the rest of the rows.
    const ctx = { mapping: imp.mapping!, columns: resolveColumns(imp.mapping!, imp.headers ?? []), headers: imp.headers ?? [] };
    const check = imp.kind === 'receipts' ? normaliseReceiptRow(cells, ctx) : normaliseTimesheetRow(cells, ctx);
    if (check.kind === 'blank') throw new AppError('BAD_INPUT', 'The corrected row is empty.', { cells: 'Fill in the row.' });
    await trx('import_lines').where({ organization_id: actor.companyId, id: lineId }).update({ fixed: JSON.stringify(cells) });
    await buildPreview(trx, actor, id, { mapping: imp.mapping, supplierId: imp.supplierId, pendingSupplier: (imp.summary.pendingSupplier as string | null) ?? null });
    await audit(trx, actor, 'import', id, 'fix_row', { row: Number(line.row_number) });
  });
  const fixed = await linesQuery(db(), actor.companyId).andWhere('l.import_id', id).andWhere('l.row_number', line.row_number).first();
  return lineFromRow(fixed);
}

export async function commitImport(actor: Actor, id: number, opts: CommitOptions, kind?: ImportKind): Promise<{ summary: CommitSummary; import: ImportDetail }> {
  await visibleImport(db(), actor, id, kind);
  const summary = await commitImportWith(db(), actor, id, opts);
  return { summary, import: await getImport(actor, id, kind) };
}

export async function discardImport(actor: Actor, id: number, kind?: ImportKind): Promise<void> {
  await previewOnly(actor, id, kind);
  await db().transaction(async (trx) => {
    await imports.updateImport(actor.companyId, id, { status: 'discarded' }, trx);
    await trx('import_chunks').where({ organization_id: actor.companyId, import_id: id }).delete();
    await imports.deleteLines(actor.companyId, id, trx);
    await audit(trx, actor, 'import', id, 'discard');
  });
}

/** The original file as uploaded, streamed back piece by piece. */
export async function downloadImport(actor: Actor, id: number, kind?: ImportKind): Promise<Response> {
  const imp = await visibleImport(db(), actor, id, kind);
  const chunks = imports.readChunks(actor.companyId, id);
  const body = new ReadableStream<Uint8Array>({
    async pull(ctrl) {
      const next = await chunks.next();
      if (next.done) ctrl.close();
      else ctrl.enqueue(new Uint8Array(next.value));
    },
  });
  const safe = imp.fileName.replace(/[^\w.\- ]+/g, '_');
  return new Response(body, {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-length': String(imp.fileBytes),
      // Served as a download, never rendered: the file is whatever the supplier sent.
      'content-disposition': `attachment; filename="${safe}"; filename*=UTF-8''${encodeURIComponent(imp.fileName)}`,
      'cache-control': 'no-store',
    },
  });
}

/** Saved mappings with their supplier's name, for the upload screen to choose from. */
export async function savedMappings(actor: Actor, kind: ImportKind) {
  const rows = await imports.listMappings(actor.companyId, kind);
  const names = new Map((await db()('suppliers').where('organization_id', actor.companyId).select('id', 'name')).map((s) => [Number(s.id), s.name as string]));
  return rows.map((r) => ({ supplierId: r.supplierId, supplierName: r.supplierId ? names.get(r.supplierId) ?? null : null, mapping: r.mapping, headerSignature: r.headerSignature }));
}
