import { z } from 'zod';
import type { CostCategory } from '../costs/categories.ts';
import type { ImportKind, Mapping } from './mapping.ts';
import { mappingSchema } from './mapping.ts';

/** How many rows with errors the preview answer lists; the rest are on the lines endpoint. */
export const ROW_ERRORS_SHOWN = 100;

/** The shapes the import screens and endpoints exchange. */
export type LineState = 'ok' | 'error' | 'skipped' | 'committed' | 'duplicate';
export type Allocation = 'unmatched' | 'job' | 'split' | 'overhead';

export interface ImportLine {
  id: number;
  rowNumber: number;
  state: LineState;
  reason: string | null;
  raw: string[];
  fixed: string[] | null;
  date: string | null;
  supplierName: string | null;
  receiptNumber: string | null;
  lineNumber: string | null;
  sku: string | null;
  description: string | null;
  quantity: string | null;
  unit: string | null;
  unitPriceCents: number | null;
  amountCents: number | null;
  taxCents: number | null;
  totalCents: number | null;
  jobRef: string | null;
  memo: string | null;
  matchedJobId: number | null;
  matchedJobCode: string | null;
  matchReason: string | null;
  category: CostCategory | null;
  allocation: Allocation | null;
  /** how the line is allocated now, once committed */
  parts?: { jobId: number | null; jobCode: string | null; overhead: boolean; category: CostCategory; amountCents: number }[];
  workerName: string | null;
  hours: number | null;
  task: string | null;
  importId: number;
}

export interface ImportCounts {
  rows: number;
  lines: number;
  errors: number;
  skipped: number;
  blank: number;
  duplicates: number;
  committed: number;
  matched: number;
  unmatched: number;
  /** sum of the good lines, cents */
  goodCents: number;
  committedCents: number;
}

export interface ImportDetail {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileBytes: number;
  fileSha256: string;
  status: 'preview' | 'committed';
  supplierId: number | null;
  supplierName: string | null;
  mapping: Mapping | null;
  mappingSource: 'given' | 'saved' | 'guessed' | null;
  mappingProblems: Record<string, string>;
  headers: string[];
  delimiter: string;
  encoding: string;
  previewRows: string[][];
  blankRows: number[];
  counts: ImportCounts;
  /** the first rows with errors (ROW_ERRORS_SHOWN at most) in row order, and how many there are in all */
  rowErrors: { total: number; rows: { rowNumber: number; reason: string }[] };
  /** this exact file was committed before */
  duplicateOf: { id: number; committedAt: string } | null;
  uploadedByName: string | null;
  uploadedAt: string;
  committedByName: string | null;
  committedAt: string | null;
  commitSummary: CommitSummary | null;
}

/** One import in the list of a company's imports. */
export interface ImportListItem {
  id: number;
  kind: ImportKind;
  fileName: string;
  fileBytes: number;
  status: string;
  supplierName: string | null;
  uploadedByName: string | null;
  uploadedAt: string;
  committedAt: string | null;
  lines: number;
  errors: number;
  duplicates: number;
  unmatched: number;
  amountCents: number;
  /** timesheets: hours on the good rows */
  hours: number;
}

export interface CommitSummary {
  added: number;
  duplicates: number;
  addedCents: number;
  errorsLeftOut: number;
  matched: number;
  unmatched: number;
  priceBookUpdates: number;
  message: string;
}

export const commitInput = z.strictObject({
  /** refuse the commit when any row has an error, instead of leaving those rows out */
  allOrNothing: z.boolean().default(false),
  /** remember this mapping for the supplier (default yes) */
  saveMapping: z.boolean().default(true),
});

export const remapInput = z.strictObject({
  mapping: mappingSchema,
  supplier: z.union([z.number().int().positive(), z.string().trim().min(1).max(160)]).nullish(),
});

export const fixRowInput = z.strictObject({
  cells: z.array(z.string().max(2000)).min(1).max(200),
});

export const importLinesQuery = z.strictObject({
  state: z.enum(['all', 'ok', 'error', 'skipped', 'committed', 'duplicate', 'problems']).default('all'),
  allocation: z.enum(['all', 'unmatched', 'job', 'split', 'overhead']).default('all'),
  page: z.coerce.number().int().min(1).max(100000).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(100),
});
export type ImportLinesQuery = z.output<typeof importLinesQuery>;
