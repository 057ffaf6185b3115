/**
 * An incremental RFC 4180 reader: feed it text in chunks of any size and it hands back
 * whole records, so a 20 MB file is never held as one string. Quoted fields may hold the
 * delimiter, doubled quotes and line breaks; records end at CRLF, LF or a lone CR. It is
 * lenient where exports are sloppy: a quote inside an unquoted field is kept as text, and
 * text after a closing quote is appended to the field.
 */
export const DELIMITERS = [',', ';', '\t'] as const;
export type Delimiter = (typeof DELIMITERS)[number];

export interface CsvRecord {
  cells: string[];
  /** 1-based record number: the row a spreadsheet shows (blank rows count). */
  row: number;
  /** The file ended inside a quoted field: the quote was never closed. */
  unterminated?: boolean;
}

const BOM = '\uFEFF';

/** No receipt or timesheet export has a row this long; a file that does is not one. */
export const MAX_RECORD_CHARS = 100_000;

export class CsvRecordTooLong extends Error {
  constructor(readonly row: number, readonly limit: number) {
    super(`Row ${row} is longer than ${limit.toLocaleString('en-US')} characters: this does not look like a receipt or timesheet export.`);
  }
}

/** The delimiter used most outside quotes in a header line; comma on a tie. */
export function sniffDelimiter(line: string): Delimiter {
  const counts: Record<Delimiter, number> = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && ch in counts) counts[ch as Delimiter]++;
  }
  let best: Delimiter = ',';
  for (const d of DELIMITERS) if (counts[d] > counts[best]) best = d;
  return best;
}

type State = 'fieldStart' | 'unquoted' | 'quoted' | 'quoteInQuoted' | 'afterCR';

export class CsvTokenizer {
  delimiter: Delimiter | null;
  private state: State = 'fieldStart';
  private field = '';
  private cells: string[] = [];
  private row = 0;
  private started = false;
  /** Text held back until the first line is complete, to sniff the delimiter from it. */
  private head = '';
  /** Characters in the record being read. */
  private recordChars = 0;
  private readonly maxRecordChars: number;

  constructor(opts: { delimiter?: Delimiter | 'auto'; maxRecordChars?: number } = {}) {
    this.delimiter = !opts.delimiter || opts.delimiter === 'auto' ? null : opts.delimiter;
    this.maxRecordChars = opts.maxRecordChars ?? MAX_RECORD_CHARS;
  }

  push(chunk: string): CsvRecord[] {
    if (!this.started) {
      this.started = true;
      if (chunk.startsWith(BOM)) chunk = chunk.slice(1);
    }
    if (this.delimiter === null) {
      this.head += chunk;
      const nl = firstLineEnd(this.head);
      if (nl < 0) {
        if (this.head.length > this.maxRecordChars) throw new CsvRecordTooLong(1, this.maxRecordChars);
        return [];
      }
      this.delimiter = sniffDelimiter(this.head.slice(0, nl));
      chunk = this.head;
      this.head = '';
    }
    return this.scan(chunk);
  }

  end(): CsvRecord[] {
    const out: CsvRecord[] = [];
    if (this.delimiter === null) {
      this.delimiter = sniffDelimiter(this.head);
      out.push(...this.scan(this.head));
      this.head = '';
    }
    const open = this.state === 'quoted';
    if (this.state === 'afterCR') this.state = 'fieldStart';
    else if (this.state !== 'fieldStart' || this.cells.length > 0 || this.field !== '') this.emit(out);
    if (open) out[out.length - 1].unterminated = true;
    return out;
  }

  private emit(out: CsvRecord[]): void {
    this.recordChars = 0;
    this.cells.push(this.field);
    this.row++;
    out.push({ cells: this.cells, row: this.row });
    this.cells = [];
    this.field = '';
    this.state = 'fieldStart';
  }

  private scan(text: string): CsvRecord[] {
    const out: CsvRecord[] = [];
    const d = this.delimiter as string;
    for (let i = 0; i < text.length; i++) {
      const ch = text[i];
      if (this.field.length + this.recordChars > this.maxRecordChars) throw new CsvRecordTooLong(this.row + 1, this.maxRecordChars);
      switch (this.state) {
        case 'afterCR':
          this.state = 'fieldStart';
          if (ch === '\n') break;
        // falls through: a lone CR ended the record and this character starts the next
        case 'fieldStart':
          if (ch === '"') { this.state = 'quoted'; break; }
          this.state = 'unquoted';
        // falls through
        case 'unquoted': {
          if (ch === d) { this.recordChars += this.field.length + 1; this.cells.push(this.field); this.field = ''; this.state = 'fieldStart'; }
          else if (ch === '\n') this.emit(out);
          else if (ch === '\r') { this.emit(out); this.state = 'afterCR'; }
          else {
            // Copy a run of ordinary characters at once: most of a file is plain text.
            let j = i + 1;
            while (j < text.length) {
              const c = text[j];
              if (c === d || c === '\n' || c === '\r') break;
              j++;
            }
            this.field += text.slice(i, j);
            i = j - 1;
          }
          break;
        }
        case 'quoted': {
          if (ch === '"') { this.state = 'quoteInQuoted'; break; }
          const j = text.indexOf('"', i);
          const stop = j < 0 ? text.length : j;
          this.field += text.slice(i, stop);
          i = stop - 1;
          break;
        }
        case 'quoteInQuoted':
          if (ch === '"') { this.field += '"'; this.state = 'quoted'; }
          else if (ch === d) { this.recordChars += this.field.length + 1; this.cells.push(this.field); this.field = ''; this.state = 'fieldStart'; }
          else if (ch === '\n') this.emit(out);
          else if (ch === '\r') { this.emit(out); this.state = 'afterCR'; }
          else { this.field += ch; this.state = 'unquoted'; }
          break;
      }
    }
    return out;
  }
}

/** Index of the first line break outside quotes, or -1 while the first line is incomplete. */
function firstLineEnd(text: string): number {
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) return i;
  }
  return -1;
}

/** Whole text → records, for small inputs and tests. */
export function parseCsv(text: string, opts: { delimiter?: Delimiter | 'auto' } = {}): CsvRecord[] {
  const t = new CsvTokenizer(opts);
  return [...t.push(text), ...t.end()];
}
