import { z } from 'zod';
import { COST_CATEGORIES } from '../costs/categories.ts';
import { DATE_FORMATS, guessDateFormat, type DateFormat } from './dates.ts';
import type { DecimalMark } from './numbers.ts';

/** What a file holds: supplier receipt lines, or crew hours. Both use the same machinery. */
export const IMPORT_KINDS = ['receipts', 'timesheet'] as const;
export type ImportKind = (typeof IMPORT_KINDS)[number];

export const RECEIPT_FIELDS = ['date', 'supplier', 'receiptNumber', 'lineNumber', 'sku', 'description', 'quantity', 'unit', 'unitPrice', 'amount', 'tax', 'jobRef', 'memo'] as const;
export const TIMESHEET_FIELDS = ['date', 'worker', 'jobRef', 'hours', 'task', 'notes'] as const;
export type ReceiptField = (typeof RECEIPT_FIELDS)[number];
export type TimesheetField = (typeof TIMESHEET_FIELDS)[number];
export type MappedField = ReceiptField | TimesheetField;

export const FIELDS_OF: Record<ImportKind, readonly MappedField[]> = { receipts: RECEIPT_FIELDS, timesheet: TIMESHEET_FIELDS };

export const FIELD_LABELS: Record<MappedField, string> = {
  date: 'Date',
  supplier: 'Supplier',
  receiptNumber: 'Receipt or invoice number',
  lineNumber: 'Line number',
  sku: 'Item or SKU',
  description: 'Description',
  quantity: 'Quantity',
  unit: 'Unit',
  unitPrice: 'Unit price',
  amount: 'Line amount',
  tax: 'Tax',
  jobRef: 'Job code or PO',
  memo: 'Memo',
  worker: 'Worker',
  hours: 'Hours',
  task: 'Task',
  notes: 'Notes',
};

/** Header names seen in exports, normalised by normaliseHeader, best first. */
const SYNONYMS: Record<MappedField, string[]> = {
  date: ['date', 'invoice date', 'inv date', 'receipt date', 'txn date', 'transaction date', 'sale date', 'order date', 'work date', 'day', 'ticket date', 'posted'],
  supplier: ['supplier', 'vendor', 'seller', 'store', 'supplier name', 'vendor name'],
  receiptNumber: ['receipt no', 'receipt', 'invoice no', 'invoice', 'inv no', 'inv', 'ticket no', 'ticket', 'doc no', 'document no', 'order no', 'txn no', 'transaction no'],
  lineNumber: ['line no', 'line', 'ln', 'seq', 'line item', 'item line'],
  sku: ['sku', 'item no', 'item code', 'item', 'product code', 'part no', 'part', 'article no', 'upc', 'catalog no', 'product'],
  description: ['description', 'desc', 'item description', 'product description', 'product', 'details', 'name'],
  quantity: ['qty', 'quantity', 'qty shipped', 'qty sold', 'units', 'count'],
  unit: ['unit', 'uom', 'um', 'unit of measure', 'u m'],
  unitPrice: ['unit price', 'price', 'price each', 'each', 'unit cost', 'rate', 'net price'],
  amount: ['amount', 'line total', 'line amount', 'ext', 'ext price', 'extended', 'extended price', 'extension', 'net amount', 'total'],
  tax: ['tax', 'sales tax', 'tax amount', 'vat'],
  jobRef: ['job', 'job no', 'job code', 'po', 'po no', 'purchase order', 'customer po', 'job po', 'project', 'reference', 'ref'],
  memo: ['memo', 'note', 'notes', 'comment', 'comments', 'remarks'],
  worker: ['worker', 'employee', 'crew member', 'name', 'person'],
  hours: ['hours', 'hrs', 'time', 'duration'],
  task: ['task', 'activity', 'work', 'phase', 'cost code'],
  notes: ['notes', 'note', 'memo', 'comment', 'comments'],
};

/** "Inv. Date" → "inv date", "Item #" → "item no", "PO#" → "po no". */
export function normaliseHeader(h: string): string {
  return h
    .replace(/^\uFEFF/, '')
    .toLowerCase()
    .replace(/#/g, ' no ')
    .replace(/\bnum(ber)?\b|\bnbr\b/g, 'no')
    .replace(/[^a-z0-9]+/g, ' ')
    .trim()
    .replace(/\s+/g, ' ');
}

export const mappingSchema = z.strictObject({
  kind: z.enum(IMPORT_KINDS).default('receipts'),
  /** Field → the file's header text for it (null or absent: not in this file). */
  columns: z.record(z.string(), z.string().trim().max(200).nullable()).default({}),
  dateFormat: z.enum(DATE_FORMATS).default('iso'),
  decimal: z.enum(['.', ',']).default('.'),
  delimiter: z.enum(['auto', ',', ';', '\t']).default('auto'),
  /** Category for lines whose item is not in the price book. */
  defaultCategory: z.enum(COST_CATEGORIES).default('material'),
}).superRefine((m, ctx) => {
  const allowed = FIELDS_OF[m.kind] as readonly string[];
  for (const k of Object.keys(m.columns)) {
    if (!allowed.includes(k)) ctx.addIssue({ code: 'custom', path: ['columns', k], message: `${k} is not a field of a ${m.kind} import.` });
  }
});
export type Mapping = z.output<typeof mappingSchema>;

/** Fields without which a row cannot become a line. */
export function requiredProblems(m: Mapping): Record<string, string> {
  const has = (f: MappedField) => Boolean(m.columns[f]);
  const out: Record<string, string> = {};
  if (!has('date')) out['columns.date'] = 'Choose the column with the date.';
  if (m.kind === 'receipts') {
    if (!has('amount') && !(has('quantity') && has('unitPrice'))) out['columns.amount'] = 'Choose the line amount column, or both quantity and unit price.';
  } else {
    if (!has('worker')) out['columns.worker'] = 'Choose the column with the worker.';
    if (!has('jobRef')) out['columns.jobRef'] = 'Choose the column with the job code.';
    if (!has('hours')) out['columns.hours'] = 'Choose the column with the hours.';
  }
  return out;
}

export interface ResolvedColumns {
  index: Partial<Record<MappedField, number>>;
  /** Header names the mapping names but the file lacks. */
  missing: string[];
}

/** The mapping's header names → column positions in this file. */
export function resolveColumns(m: Mapping, headers: string[]): ResolvedColumns {
  const norm = headers.map(normaliseHeader);
  const index: Partial<Record<MappedField, number>> = {};
  const missing: string[] = [];
  for (const [field, header] of Object.entries(m.columns)) {
    if (!header) continue;
    const i = norm.indexOf(normaliseHeader(header));
    if (i < 0) missing.push(header);
    else index[field as MappedField] = i;
  }
  return { index, missing };
}

/** True when every column the mapping names is in the file. */
export function mappingFits(m: Mapping, headers: string[]): boolean {
  const r = resolveColumns(m, headers);
  return r.missing.length === 0 && Object.keys(requiredProblems(m)).length === 0;
}

export function headerSignature(headers: string[]): string {
  return headers.map(normaliseHeader).join('|');
}

const COMMA_DECIMAL = /^\(?-?[$€£]?\s*\d{1,3}(?:[. ]\d{3})*,\d{1,2}\)?-?$/;

/** A first mapping from the headers and a few rows: synonyms for columns, samples for formats. */
export function guessMapping(kind: ImportKind, headers: string[], samples: string[][], delimiter: Mapping['delimiter'] = 'auto'): Mapping {
  const norm = headers.map(normaliseHeader);
  const used = new Set<number>();
  const columns: Record<string, string | null> = {};
  for (const field of FIELDS_OF[kind]) {
    let found = -1;
    for (const syn of SYNONYMS[field]) {
      found = norm.findIndex((h, i) => !used.has(i) && h === syn);
      if (found >= 0) break;
    }
    if (found >= 0) { used.add(found); columns[field] = headers[found].trim(); }
  }
  const col = (f: MappedField) => (columns[f] ? norm.indexOf(normaliseHeader(columns[f]!)) : -1);
  const di = col('date');
  const dateFormat: DateFormat = di >= 0 ? guessDateFormat(samples.map((r) => r[di] ?? '')) : 'iso';
  const moneyCols = (['amount', 'unitPrice', 'tax'] as const).map(col).filter((i) => i >= 0);
  const decimal: DecimalMark = samples.some((r) => moneyCols.some((i) => COMMA_DECIMAL.test((r[i] ?? '').trim()))) ? ',' : '.';
  return mappingSchema.parse({ kind, columns, dateFormat, decimal, delimiter });
}

/**
 * The best saved mapping for a file: the supplier's own when it fits, else one saved for
 * exactly these headers, else the fitting one that maps the most columns.
 */
export function chooseMapping<T extends { mapping: Mapping; supplierId: number | null; headerSignature: string }>(
  saved: T[],
  headers: string[],
  supplierId: number | null,
): T | null {
  const fitting = saved.filter((s) => mappingFits(s.mapping, headers));
  if (supplierId !== null) {
    const own = fitting.find((s) => s.supplierId === supplierId);
    if (own) return own;
  }
  const sig = headerSignature(headers);
  const exact = fitting.find((s) => s.headerSignature === sig);
  if (exact) return exact;
  const ranked = [...fitting].sort((a, b) => Object.values(b.mapping.columns).filter(Boolean).length - Object.values(a.mapping.columns).filter(Boolean).length);
  return ranked[0] ?? null;
}
