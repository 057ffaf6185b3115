import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';

/**
 * The shipped Inter comes as variable WOFF2 only, and fontkit's TrueType subsetter (which
 * pdfkit uses) reads glyphs through the `loca` table that WOFF2's transformed `glyf` no
 * longer has, so embedding it fails. Here the default instance is rebuilt as a plain static
 * TrueType font once per process: every glyph's outline re-encoded, composite glyphs
 * flattened, variation and hinting tables dropped.
 */
const require = createRequire(import.meta.url);
// fontkit ships no types; only create() and the WOFF2 internals below are used.
const fontkit = require('fontkit') as { create(buf: Buffer): unknown };

const DROP = new Set(['glyf', 'loca', 'hmtx', 'DSIG', 'fvar', 'gvar', 'avar', 'HVAR', 'MVAR', 'VVAR', 'STAT', 'cvar', 'fpgm', 'prep', 'cvt ', 'hdmx', 'LTSH', 'VDMX', 'gasp']);

interface Woff2Like {
  numGlyphs: number;
  directory: { tables: Record<string, { offset: number; length: number; transformed?: boolean }> };
  stream: { buffer: Uint8Array };
  _decompress(): void;
  getGlyph(id: number): { path: unknown; advanceWidth: number; _getMetrics(): { leftBearing: number } };
}

interface PathLike {
  commands: { command: string; args: number[] }[];
}

/**
 * One TrueType simple glyph from an outline: every point stored as a full 16-bit delta
 * (no packing; size does not matter here), no instructions.
 */
function encodeGlyph(path: PathLike): Buffer {
  const xs: number[] = [];
  const ys: number[] = [];
  const on: boolean[] = [];
  const ends: number[] = [];
  const add = (x: number, y: number, onCurve: boolean) => { xs.push(Math.round(x)); ys.push(Math.round(y)); on.push(onCurve); };
  for (const c of path.commands) {
    if (c.command === 'moveTo') {
      if (xs.length && ends[ends.length - 1] !== xs.length - 1) ends.push(xs.length - 1);
      add(c.args[0], c.args[1], true);
    } else if (c.command === 'lineTo') add(c.args[0], c.args[1], true);
    else if (c.command === 'quadraticCurveTo') { add(c.args[0], c.args[1], false); add(c.args[2], c.args[3], true); }
    else if (c.command === 'bezierCurveTo') { add(c.args[4], c.args[5], true); }
    else if (c.command === 'closePath' && xs.length && ends[ends.length - 1] !== xs.length - 1) ends.push(xs.length - 1);
  }
  if (xs.length && ends[ends.length - 1] !== xs.length - 1) ends.push(xs.length - 1);
  if (!xs.length) return Buffer.alloc(0);
  const n = xs.length;
  const buf = Buffer.alloc(10 + ends.length * 2 + 2 + n + n * 4 + 1);
  let p = 0;
  buf.writeInt16BE(ends.length, p); p += 2;
  buf.writeInt16BE(Math.min(...xs), p); p += 2;
  buf.writeInt16BE(Math.min(...ys), p); p += 2;
  buf.writeInt16BE(Math.max(...xs), p); p += 2;
  buf.writeInt16BE(Math.max(...ys), p); p += 2;
  for (const e of ends) { buf.writeUInt16BE(e, p); p += 2; }
  buf.writeUInt16BE(0, p); p += 2;
  for (let i = 0; i < n; i++) buf[p++] = on[i] ? 1 : 0;
  let last = 0;
  for (const x of xs) { buf.writeInt16BE(x - last, p); p += 2; last = x; }
  last = 0;
  for (const y of ys) { buf.writeInt16BE(y - last, p); p += 2; last = y; }
  return buf.subarray(0, p + (p % 2));
}

function checksum(buf: Buffer): number {
  let sum = 0;
  const padded = Buffer.concat([buf, Buffer.alloc((4 - (buf.length % 4)) % 4)]);
  for (let i = 0; i < padded.length; i += 4) sum = (sum + padded.readUInt32BE(i)) >>> 0;
  return sum;
}

export function woff2ToTtf(woff2: Buffer): Buffer {
  const base = fontkit.create(woff2) as unknown as Woff2Like;
  base._decompress();
  const font = base;
  const raw = (tag: string) => {
    const t = base.directory.tables[tag];
    return Buffer.from(base.stream.buffer.subarray(t.offset, t.offset + t.length));
  };
  const glyphs: Buffer[] = [];
  const offsets: number[] = [];
  const hmtx = Buffer.alloc(font.numGlyphs * 4);
  let offset = 0;
  for (let gid = 0; gid < font.numGlyphs; gid++) {
    const g = font.getGlyph(gid);
    const enc = encodeGlyph(g.path as PathLike);
    const padded = Buffer.concat([enc, Buffer.alloc(enc.length % 2)]);
    offsets.push(offset);
    glyphs.push(padded);
    offset += padded.length;
    hmtx.writeUInt16BE(Math.round(g.advanceWidth), gid * 4);
    hmtx.writeInt16BE(Math.round(g._getMetrics().leftBearing || 0), gid * 4 + 2);
  }
  offsets.push(offset);
  const loca = Buffer.alloc(offsets.length * 4);
  offsets.forEach((o, i) => loca.writeUInt32BE(o, i * 4));

  const tables = new Map<string, Buffer>();
  for (const tag of Object.keys(base.directory.tables)) if (!DROP.has(tag)) tables.set(tag, raw(tag));
  const head = Buffer.from(tables.get('head')!);
  head.writeInt16BE(1, 50); // indexToLocFormat: long offsets
  head.writeUInt32BE(0, 8); // checkSumAdjustment, set below
  tables.set('head', head);
  const hhea = Buffer.from(tables.get('hhea')!);
  hhea.writeUInt16BE(font.numGlyphs, 34); // numberOfHMetrics: one per glyph
  tables.set('hhea', hhea);
  tables.set('glyf', Buffer.concat(glyphs));
  tables.set('loca', loca);
  tables.set('hmtx', hmtx);

  const tags = [...tables.keys()].sort();
  const n = tags.length;
  const pow = 2 ** Math.floor(Math.log2(n));
  const header = Buffer.alloc(12 + n * 16);
  header.writeUInt32BE(0x00010000, 0);
  header.writeUInt16BE(n, 4);
  header.writeUInt16BE(pow * 16, 6);
  header.writeUInt16BE(Math.log2(pow), 8);
  header.writeUInt16BE(n * 16 - pow * 16, 10);
  const bodies: Buffer[] = [];
  let pos = header.length;
  tags.forEach((tag, i) => {
    const data = tables.get(tag)!;
    header.write(tag.padEnd(4, ' '), 12 + i * 16, 'latin1');
    header.writeUInt32BE(checksum(data), 16 + i * 16);
    header.writeUInt32BE(pos, 20 + i * 16);
    header.writeUInt32BE(data.length, 24 + i * 16);
    const padded = Buffer.concat([data, Buffer.alloc((4 - (data.length % 4)) % 4)]);
    bodies.push(padded);
    pos += padded.length;
  });
  const out = Buffer.concat([header, ...bodies]);
  const headAt = header.readUInt32BE(20 + tags.indexOf('head') * 16);
  out.writeUInt32BE((0xb1b0afba - checksum(out)) >>> 0, headAt + 8);
  return out;
}

let cache: Buffer | undefined;

/** Inter (its default, regular instance) as static TrueType, made from the shipped file once. */
export function interFont(): Buffer {
  cache ??= woff2ToTtf(readFileSync(require.resolve('@fontsource-variable/inter/files/inter-latin-wght-normal.woff2')));
  return cache;
}
