import { z } from 'zod';
import { COST_CATEGORIES, type CostCategory } from './categories.ts';
import { centsField, dateField, idField, idList, optionalDate, optionalId, optionalText, page, pageSize } from './fields.ts';
import { PERCENT_SCALE } from '../allocation/split.ts';

/** Where a cost line came from. */
export const COST_KINDS = ['receipt', 'time', 'rental', 'manual'] as const;
export type CostKind = (typeof COST_KINDS)[number];
export const COST_KIND_LABELS: Record<CostKind, string> = { receipt: 'Receipt line', time: 'Crew hours', rental: 'Rental', manual: 'Entered by hand' };

/** A cost entered by hand: permit and dump fees, subcontractors, anything without a receipt file. */
export const manualCostInput = z
  .strictObject({
    jobId: optionalId('Choose a job of this company.'),
    overhead: z.boolean().default(false),
    category: z.enum(COST_CATEGORIES, { message: 'Choose a category.' }),
    date: dateField,
    description: z.string().trim().min(1, 'Say what the cost was for, e.g. "Dump fee, old fence".').max(500),
    supplierId: optionalId('Choose a supplier from the list.'),
    amountCents: centsField(),
  })
  .refine((v) => v.overhead || v.jobId !== null, { path: ['jobId'], message: 'Choose the job, or mark the cost as overhead.' })
  .refine((v) => !(v.overhead && v.jobId !== null), { path: ['overhead'], message: 'An overhead cost belongs to no job.' });
export type ManualCostInput = z.output<typeof manualCostInput>;

export const COST_SORTS = ['date', 'job', 'category', 'supplier', 'amount', 'description', 'kind'] as const;

export const costListQuery = z.strictObject({
  job: idList,
  category: z
    .string()
    .optional()
    .transform((v) => (v ? v.split(',').filter(Boolean) : []))
    .pipe(z.array(z.enum(COST_CATEGORIES))),
  supplier: idList,
  kind: z
    .string()
    .optional()
    .transform((v) => (v ? v.split(',').filter(Boolean) : []))
    .pipe(z.array(z.enum(COST_KINDS))),
  from: optionalDate,
  to: optionalDate,
  /** only receipt lines waiting for a job */
  unmatched: z.enum(['1', 'true', '0', 'false']).optional().transform((v) => v === '1' || v === 'true'),
  overhead: z.enum(['1', 'true', '0', 'false']).optional().transform((v) => v === '1' || v === 'true'),
  q: z.string().trim().max(100).optional(),
  sort: z.enum(COST_SORTS).default('date'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  page,
  pageSize: pageSize(500, 50),
});
export type CostListQuery = z.output<typeof costListQuery>;

export interface CostRow {
  kind: CostKind;
  id: number;
  date: string;
  jobId: number | null;
  jobCode: string | null;
  overhead: boolean;
  category: CostCategory;
  supplierId: number | null;
  supplierName: string | null;
  description: string | null;
  /** in `unit` */
  quantity: string | null;
  unit: string | null;
  amountCents: number;
  /** receipt lines: where the line came from */
  importId: number | null;
  rowNumber: number | null;
  importLineId: number | null;
}

export interface CostTotals {
  count: number;
  amountCents: number;
  byCategory: Partial<Record<CostCategory, number>>;
}

/** Allocating one receipt line whole: to a job, to overhead, or back to unmatched. */
export const allocationInput = z.discriminatedUnion('mode', [
  z.strictObject({ mode: z.literal('job'), jobId: idField('Choose a job of this company.'), category: z.enum(COST_CATEGORIES, { message: 'Choose a category.' }) }),
  z.strictObject({ mode: z.literal('overhead'), category: z.enum(COST_CATEGORIES, { message: 'Choose a category.' }) }),
  z.strictObject({ mode: z.literal('unmatched') }),
]);
export type AllocationInput = z.output<typeof allocationInput>;

const splitPart = z.strictObject({
  /** null: this part is overhead */
  jobId: optionalId('Choose a job of this company.'),
  category: z.enum(COST_CATEGORIES, { message: 'Choose a category.' }),
  amountCents: centsField().optional(),
  percent: z.coerce.number().gt(0, 'Above 0 %.').max(100, 'At most 100 %.').optional(),
});

/** One line across several jobs (or overhead), by amount or by percentage. */
export const splitInput = z
  .strictObject({
    by: z.enum(['amount', 'percent']),
    parts: z.array(splitPart).min(2, 'A split needs at least two parts.').max(20, 'At most 20 parts.'),
  })
  .superRefine((v, ctx) => {
    v.parts.forEach((p, i) => {
      if (v.by === 'amount' && p.amountCents === undefined) ctx.addIssue({ code: 'custom', path: ['parts', i, 'amountCents'], message: 'Give this part’s amount.' });
      if (v.by === 'percent' && p.percent === undefined) ctx.addIssue({ code: 'custom', path: ['parts', i, 'percent'], message: 'Give this part’s percentage.' });
      if (v.by === 'percent' && p.percent !== undefined && Math.abs(Math.round(p.percent * 10 ** PERCENT_SCALE) - p.percent * 10 ** PERCENT_SCALE) > 1e-6) {
        ctx.addIssue({ code: 'custom', path: ['parts', i, 'percent'], message: `At most ${PERCENT_SCALE} decimals.` });
      }
    });
  });
export type SplitInput = z.output<typeof splitInput>;

export const receiptLineQuery = z.strictObject({
  allocation: z.enum(['unmatched', 'job', 'split', 'overhead', 'all']).default('unmatched'),
  importId: z.coerce.number().int().positive().optional(),
  supplier: idList,
  q: z.string().trim().max(100).optional(),
  sort: z.enum(['date', 'amount', 'supplier', 'description', 'row']).default('date'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  page,
  pageSize: pageSize(200, 50),
});
export type ReceiptLineQuery = z.output<typeof receiptLineQuery>;

export const costingQuery = z.strictObject({
  /** flag a category running more than this percent over its estimate */
  flagPct: z.coerce.number().min(0).max(500).optional(),
});

export { optionalText };
