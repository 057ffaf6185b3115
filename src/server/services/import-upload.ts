import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import busboy from 'busboy';
import { AppError } from '../../lib/errors.ts';
import * as imports from '../repos/imports.ts';
import { CHUNK_BYTES } from '../repos/imports.ts';
import type { ImportKind } from '../../lib/csv/mapping.ts';
import type { Actor } from '../http.ts';
import { env } from '../env.ts';
import { db } from '../db.ts';

export interface StoredUpload {
  importId: number;
  fields: Record<string, string>;
}

/** Room for the multipart envelope and the small fields around the file. */
const ENVELOPE_BYTES = 256 * 1024;

function tooLarge(max: number): AppError {
  return new AppError('PAYLOAD_TOO_LARGE', `The file is larger than ${Math.round(max / 1024 / 1024)} MB. Split it into smaller files (for example one per month) and import each.`);
}

/** Spreadsheet workbooks and other binary files are refused with what to do instead. */
function binaryKind(head: Buffer): string | null {
  if (head.subarray(0, 4).equals(Buffer.from([0x50, 0x4b, 0x03, 0x04]))) return 'a spreadsheet workbook (.xlsx)';
  if (head.subarray(0, 4).equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0]))) return 'an old-style Excel workbook (.xls)';
  if (head.subarray(0, 5).toString('latin1') === '%PDF-') return 'a PDF';
  const sample = head.subarray(0, 4096);
  const utf16 = sample.length > 1 && ((sample[0] === 0xff && sample[1] === 0xfe) || (sample[0] === 0xfe && sample[1] === 0xff));
  if (utf16) return 'UTF-16 text';
  return sample.includes(0) ? 'a binary file' : null;
}

/**
 * Streams a multipart upload into the database in 1 MB pieces as it arrives, hashing it on
 * the way, so the file is never held whole in memory. The declared size is checked before
 * a byte is read; a body that turns out larger is cut off at the limit and refused.
 */
export async function receiveUpload(actor: Actor, request: Request, kind: ImportKind): Promise<StoredUpload> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type)) throw new AppError('UNSUPPORTED_MEDIA_TYPE', 'Send the file as multipart/form-data with a field named "file".');
  const max = env().MAX_UPLOAD_BYTES;
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > max + ENVELOPE_BYTES) throw tooLarge(max);
  if (!request.body) throw new AppError('BAD_INPUT', 'Choose a CSV file to import.', { file: 'Choose a CSV file.' });

  const fields: Record<string, string> = {};
  let importId: number | null = null;
  let failure: AppError | null = null;
  let fileTask: Promise<void> | null = null;
  const bb = busboy({ headers: Object.fromEntries(request.headers), limits: { fileSize: max, files: 1, fields: 20, fieldSize: 256 * 1024 }, defParamCharset: 'utf8' });
  const source = Readable.fromWeb(request.body as import('node:stream/web').ReadableStream);

  const store = async (stream: Readable, fileName: string) => {
    const hash = createHash('sha256');
    let seq = 0;
    let bytes = 0;
    let pieces: Buffer[] = [];
    let held = 0;
    const flush = async () => {
      if (!held) return;
      const data = Buffer.concat(pieces);
      pieces = [];
      held = 0;
      if (seq === 0) {
        const binary = binaryKind(data);
        if (binary) throw new AppError('BAD_INPUT', `This file is ${binary}, not CSV text. Save or export it as CSV (comma or semicolon separated) and upload that.`, { file: 'Not a CSV file.' });
      }
      await imports.writeChunk(actor.companyId, importId!, seq++, data);
    };
    importId = await imports.insertImport(actor.companyId, { kind, fileName: fileName || 'upload.csv', uploadedBy: actor.userId });
    for await (const piece of stream as AsyncIterable<Buffer>) {
      hash.update(piece);
      bytes += piece.length;
      pieces.push(piece);
      held += piece.length;
      if (held >= CHUNK_BYTES) await flush();
    }
    if ((stream as Readable & { truncated?: boolean }).truncated) throw tooLarge(max);
    await flush();
    if (bytes === 0) throw new AppError('BAD_INPUT', 'The file is empty.', { file: 'The file is empty.' });
    await imports.updateImport(actor.companyId, importId, { file_sha256: hash.digest('hex'), file_bytes: bytes });
  };

  await new Promise<void>((resolve, reject) => {
    bb.on('field', (name, value) => { fields[name] = value; });
    bb.on('file', (name, stream, info) => {
      if (name !== 'file' || fileTask) { stream.resume(); return; }
      // Past the limit: stop reading the body and answer 413 once the stored part is cleaned up.
      stream.on('limit', () => { failure = tooLarge(max); source.unpipe(bb); stream.destroy(); void fileTask?.finally(resolve); });
      fileTask = store(stream, info.filename ?? '').catch((err) => { failure ??= err instanceof AppError ? err : null; stream.resume(); if (!failure) reject(err); });
    });
    bb.on('filesLimit', () => { failure ??= new AppError('BAD_INPUT', 'Upload one file at a time.', { file: 'One file per upload.' }); });
    bb.on('close', () => resolve());
    bb.on('error', (err) => { failure ??= new AppError('BAD_INPUT', `The upload could not be read: ${(err as Error).message}`); resolve(); });
    source.on('error', (err) => reject(err));
    source.pipe(bb);
  });
  // Assigned inside the busboy callbacks, which the compiler cannot follow.
  const task = fileTask as Promise<void> | null;
  if (task && !failure) await task;
  const id = importId as number | null;
  if (failure || id === null) {
    if (id !== null) await imports.deleteImport(actor.companyId, id, db()).catch(() => {});
    throw failure ?? new AppError('BAD_INPUT', 'Choose a CSV file to import.', { file: 'Choose a CSV file.' });
  }
  return { importId: id, fields };
}
