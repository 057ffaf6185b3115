import { randomBytes } from 'node:crypto';
import type { Client, Res } from '../setup/client';

/** A multipart/form-data body: small fields first, then the file, as the upload island sends it. */
export function multipart(fields: Record<string, string>, file: { name: string; content: string | Buffer; type?: string }): { body: Buffer; type: string } {
  const boundary = `----tallypost${randomBytes(8).toString('hex')}`;
  const parts: Buffer[] = [];
  for (const [k, v] of Object.entries(fields)) {
    parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`));
  }
  parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${file.name}"\r\nContent-Type: ${file.type ?? 'text/csv'}\r\n\r\n`));
  parts.push(typeof file.content === 'string' ? Buffer.from(file.content) : file.content);
  parts.push(Buffer.from(`\r\n--${boundary}--\r\n`));
  return { body: Buffer.concat(parts), type: `multipart/form-data; boundary=${boundary}` };
}

export function upload(client: Client, path: string, file: { name: string; content: string | Buffer }, fields: Record<string, string> = {}): Promise<Res> {
  const m = multipart(fields, file);
  return client.request('POST', path, { body: m.body, headers: { 'content-type': m.type } });
}

export async function ok<T = any>(p: Promise<Res<T>>, what: string): Promise<T> {
  const r = await p;
  if (r.status >= 300) throw new Error(`${what}: ${r.status} ${r.text.slice(0, 500)}`);
  return r.body;
}
