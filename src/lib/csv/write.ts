import { neutraliseCsvCell } from '../text.ts';

export interface CsvColumn<T> {
  header: string;
  /** Text cells are neutralised against formula injection; numbers we format ourselves are not. */
  type: 'text' | 'number';
  value: (row: T) => string | number | null | undefined;
}

/** One RFC 4180 field: quoted when it holds a delimiter, a quote or a line break. */
export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

export function csvLine(cells: string[]): string {
  return `${cells.map(csvField).join(',')}\r\n`;
}

/** Rows → CSV text with CRLF line ends; cells that a spreadsheet would run as formulas are made text. */
export function toCsv<T>(columns: CsvColumn<T>[], rows: Iterable<T>): string {
  let out = csvLine(columns.map((c) => neutraliseCsvCell(c.header)));
  for (const r of rows) out += csvRow(columns, r);
  return out;
}

export function csvRow<T>(columns: CsvColumn<T>[], r: T): string {
  return csvLine(
    columns.map((c) => {
      const v = c.value(r);
      if (v === null || v === undefined) return '';
      const s = String(v);
      return c.type === 'text' ? neutraliseCsvCell(s) : s;
    }),
  );
}

/** Cents → "1234.56" / "-12.50" for exports (no grouping, so spreadsheets read them as numbers). */
export function centsText(cents: number | null | undefined): string {
  if (cents === null || cents === undefined) return '';
  const sign = cents < 0 ? '-' : '';
  const a = Math.abs(cents);
  return `${sign}${Math.floor(a / 100)}.${String(a % 100).padStart(2, '0')}`;
}
