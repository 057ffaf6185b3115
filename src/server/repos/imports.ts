import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { ImportKind, Mapping } from '../../lib/csv/mapping.ts';

type Q = Knex | Knex.Transaction;

/** Size of the pieces an uploaded file is kept in (well under max_allowed_packet). */
export const CHUNK_BYTES = 1024 * 1024;

export interface ImportRow {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileSha256: string;
  fileBytes: number;
  supplierId: number | null;
  supplierName: string | null;
  mapping: Mapping | null;
  headers: string[] | null;
  status: 'uploading' | 'preview' | 'committed' | 'discarded';
  summary: Record<string, unknown>;
  commitSummary: Record<string, unknown> | null;
  uploadedBy: string;
  uploadedByName: string | null;
  uploadedAt: string;
  committedBy: string | null;
  committedByName: string | null;
  committedAt: string | null;
}

const json = <T>(v: unknown): T | null => (v === null || v === undefined ? null : typeof v === 'string' ? (JSON.parse(v) as T) : (v as T));
const iso = (v: unknown) => (v ? new Date(v as string).toISOString() : null);

function fromRow(r: Record<string, unknown>): ImportRow {
  return {
    id: Number(r.id),
    kind: r.kind as ImportKind,
    fileName: r.file_name as string,
    fileSha256: r.file_sha256 as string,
    fileBytes: toInt(r.file_bytes),
    supplierId: r.supplier_id == null ? null : Number(r.supplier_id),
    supplierName: (r.supplier_name as string) ?? null,
    mapping: json<Mapping>(r.mapping),
    headers: json<string[]>(r.headers),
    status: r.status as ImportRow['status'],
    summary: json<Record<string, unknown>>(r.summary) ?? {},
    commitSummary: json<Record<string, unknown>>(r.commit_summary),
    uploadedBy: r.uploaded_by as string,
    uploadedByName: (r.uploaded_by_name as string) ?? null,
    uploadedAt: iso(r.uploaded_at)!,
    committedBy: (r.committed_by as string) ?? null,
    committedByName: (r.committed_by_name as string) ?? null,
    committedAt: iso(r.committed_at),
  };
}

function selectImports(q: Q, companyId: string) {
  return q('imports as i')
    .leftJoin('suppliers as s', function () { this.on('s.id', 'i.supplier_id').andOn('s.organization_id', 'i.organization_id'); })
    .leftJoin('user as uu', 'uu.id', 'i.uploaded_by')
    .leftJoin('user as uc', 'uc.id', 'i.committed_by')
    .where('i.organization_id', companyId)
    .select('i.*', 's.name as supplier_name', 'uu.name as uploaded_by_name', 'uc.name as committed_by_name');
}

export async function findImport(companyId: string, id: number, q: Q = db(), opts: { forUpdate?: boolean } = {}): Promise<ImportRow | undefined> {
  if (opts.forUpdate) await q('imports').where({ organization_id: companyId, id }).forUpdate().first('id');
  const r = await selectImports(q, companyId).andWhere('i.id', id).first();
  return r ? fromRow(r) : undefined;
}

export async function listImports(companyId: string, opts: { kind?: ImportKind; status?: string[]; limit: number }, q: Q = db()): Promise<ImportRow[]> {
  const b = selectImports(q, companyId).whereNot('i.status', 'uploading').whereNot('i.status', 'discarded');
  if (opts.kind) b.andWhere('i.kind', opts.kind);
  if (opts.status?.length) b.whereIn('i.status', opts.status);
  const rows = await b.orderBy('i.id', 'desc').limit(opts.limit);
  return rows.map(fromRow);
}

export async function insertImport(companyId: string, row: { kind: ImportKind; fileName: string; uploadedBy: string }, q: Q = db()): Promise<number> {
  const [id] = await q('imports').insert({
    organization_id: companyId,
    kind: row.kind,
    file_name: row.fileName.slice(0, 255),
    file_sha256: '0'.repeat(64),
    file_bytes: 0,
    status: 'uploading',
    uploaded_by: row.uploadedBy,
  });
  return Number(id);
}

export async function updateImport(companyId: string, id: number, row: Record<string, unknown>, q: Q = db()): Promise<void> {
  const out: Record<string, unknown> = { updated_at: q.fn.now(3) };
  for (const [k, v] of Object.entries(row)) out[k] = v !== null && typeof v === 'object' && !(v instanceof Date) ? JSON.stringify(v) : v;
  await q('imports').where({ organization_id: companyId, id }).update(out);
}

export async function deleteImport(companyId: string, id: number, q: Q = db()): Promise<void> {
  await q('imports').where({ organization_id: companyId, id }).delete();
}

/** A committed import of a file with exactly these bytes, if any. */
export async function committedWithHash(companyId: string, sha256: string, exceptId: number, q: Q = db()): Promise<{ id: number; committedAt: string } | null> {
  const r = await q('imports').where({ organization_id: companyId, file_sha256: sha256, status: 'committed' }).whereNot('id', exceptId).orderBy('id').first('id', 'committed_at');
  return r ? { id: Number(r.id), committedAt: iso(r.committed_at)! } : null;
}

export async function writeChunk(companyId: string, importId: number, seq: number, data: Buffer, q: Q = db()): Promise<void> {
  await q('import_chunks').insert({ organization_id: companyId, import_id: importId, seq, data });
}

/** The stored file, piece by piece, without holding it whole. */
export async function* readChunks(companyId: string, importId: number, q: Q = db()): AsyncGenerator<Buffer> {
  const { n } = (await q('import_chunks').where({ organization_id: companyId, import_id: importId }).count({ n: '*' }).first()) as { n: number };
  for (let seq = 0; seq < Number(n); seq++) {
    const r = await q('import_chunks').where({ organization_id: companyId, import_id: importId, seq }).first('data');
    if (!r) throw new Error(`import ${importId} is missing chunk ${seq}`);
    yield r.data as Buffer;
  }
}

export async function insertLines(rows: Record<string, unknown>[], q: Q): Promise<void> {
  // Batches keep each statement well under MariaDB's placeholder and packet limits.
  for (let i = 0; i < rows.length; i += 1000) await q('import_lines').insert(rows.slice(i, i + 1000));
}

export async function deleteLines(companyId: string, importId: number, q: Q): Promise<void> {
  await q('import_lines').where({ organization_id: companyId, import_id: importId }).delete();
}

export interface LineCounts {
  rows: number;
  byState: Record<string, number>;
  okCents: number;
  committedCents: number;
  matched: number;
  unmatched: number;
}

export async function countLines(companyId: string, importId: number, q: Q = db()): Promise<LineCounts> {
  const rows = await q('import_lines')
    .where({ organization_id: companyId, import_id: importId })
    .groupBy('state')
    .select('state')
    .select(q.raw('COUNT(*) AS n, COALESCE(SUM(total_cents), 0) AS cents, SUM(matched_job_id IS NOT NULL) AS matched'));
  const byState: Record<string, number> = {};
  let okCents = 0, committedCents = 0, matched = 0, unmatched = 0, total = 0;
  for (const r of rows) {
    const n = Number(r.n);
    byState[r.state] = n;
    total += n;
    if (r.state === 'ok') okCents = toInt(r.cents);
    if (r.state === 'committed') committedCents = toInt(r.cents);
    if (r.state === 'ok' || r.state === 'committed') { matched += Number(r.matched); unmatched += n - Number(r.matched); }
  }
  return { rows: total, byState, okCents, committedCents, matched, unmatched };
}

/** Which of these line keys are already committed, and where. */
export async function committedKeys(companyId: string, keys: string[], q: Q): Promise<Map<string, { importId: number; rowNumber: number }>> {
  const out = new Map<string, { importId: number; rowNumber: number }>();
  for (let i = 0; i < keys.length; i += 1000) {
    const rows = await q('import_lines').where('organization_id', companyId).whereIn('dedupe_key', keys.slice(i, i + 1000)).select('dedupe_key', 'import_id', 'row_number');
    for (const r of rows) out.set(r.dedupe_key, { importId: Number(r.import_id), rowNumber: Number(r.row_number) });
  }
  return out;
}

export interface SavedMapping {
  id: number;
  supplierId: number | null;
  mapping: Mapping;
  headers: string[];
  headerSignature: string;
}

export async function listMappings(companyId: string, kind: ImportKind, q: Q = db()): Promise<SavedMapping[]> {
  const rows = await q('import_mappings').where({ organization_id: companyId, kind }).orderBy('updated_at', 'desc');
  return rows.map((r) => ({ id: Number(r.id), supplierId: r.supplier_id == null ? null : Number(r.supplier_id), mapping: json<Mapping>(r.mapping)!, headers: json<string[]>(r.headers)!, headerSignature: r.header_signature }));
}

export async function saveMapping(companyId: string, row: { kind: ImportKind; supplierId: number | null; key: string; mapping: Mapping; headers: string[]; headerSignature: string; userId: string }, q: Q): Promise<void> {
  await q('import_mappings')
    .insert({
      organization_id: companyId,
      kind: row.kind,
      supplier_id: row.supplierId,
      mapping_key: row.key,
      mapping: JSON.stringify(row.mapping),
      headers: JSON.stringify(row.headers),
      header_signature: row.headerSignature,
      updated_by: row.userId,
      updated_at: q.fn.now(3),
    })
    .onConflict(['organization_id', 'kind', 'mapping_key'])
    .merge(['mapping', 'headers', 'header_signature', 'updated_by', 'updated_at']);
}
