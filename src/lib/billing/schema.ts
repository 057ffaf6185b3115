import { z } from 'zod';
import { INVOICE_KINDS, INVOICE_STATUSES, LINE_CATEGORIES } from './invoice.ts';
import { TERMS } from './terms.ts';
import { MANUAL_METHODS } from './payments.ts';
import { COST_CATEGORIES } from '../costs/categories.ts';
import { parseSchedule } from '../reminders/index.ts';

const MAX_CENTS = 100_000_000_00; // $100 million: far past any fence, far below 2^53
const cents = (what: string) =>
  z.number({ message: `Enter ${what} in cents.` }).int(`Enter ${what} in whole cents.`).min(0, 'Cannot be negative.').max(MAX_CENTS, 'That is more than Tallypost takes.');
const positiveCents = (what: string) => cents(what).min(1, `Enter ${what} above zero.`);
const pct = z.number({ message: 'Enter a percent.' }).min(0, 'Cannot be negative.').max(100, 'At most 100 %.').refine((v) => Math.abs(v * 10_000 - Math.round(v * 10_000)) < 1e-6, 'At most four decimals.');
const isoDate = z.string().trim().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date such as 2026-05-14.').refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)), 'Use a date such as 2026-05-14.');
const optionalText = (max: number) => z.string().trim().max(max, `At most ${max} characters.`).nullish().transform((v) => (v ? v : null));
const id = z.union([z.number(), z.string()]).transform((v) => Number(v)).refine((v) => Number.isSafeInteger(v) && v > 0, 'Choose one from the list.');

export const lineInput = z.strictObject({
  description: z.string().trim().min(1, 'Describe the line.').max(500, 'At most 500 characters.'),
  category: z.enum(LINE_CATEGORIES, { message: 'Choose materials, labour or other.' }),
  /** units, to 0.001 */
  quantity: z.number({ message: 'Enter a quantity.' }).positive('Above zero.').max(1_000_000, 'Too large.').refine((v) => Math.abs(v * 1000 - Math.round(v * 1000)) < 1e-6, 'At most three decimals.'),
  unitPriceCents: cents('the unit price'),
  taxable: z.boolean().nullish().transform((v) => v ?? null),
});
export type LineFormInput = z.output<typeof lineInput>;

const draftFields = {
  kind: z.enum(INVOICE_KINDS, { message: 'Choose the kind of invoice.' }),
  /** deposit: percent of the contract; progress: percent complete */
  basisPct: pct.nullish().transform((v) => v ?? null),
  /** deposit asked as an amount instead of a percent */
  requestedCents: positiveCents('the deposit').nullish().transform((v) => v ?? null),
  lines: z.array(lineInput).max(100, 'At most 100 lines.').default([]),
  changeOrderIds: z.array(id).max(50).default([]),
  terms: z.enum(TERMS, { message: 'Choose the payment terms.' }),
  termsDays: z.number().int('Whole days.').min(0, 'Cannot be negative.').max(365, 'At most 365 days.').nullish().transform((v) => v ?? null),
  notes: optionalText(4000),
  retainagePct: pct.nullish().transform((v) => v ?? null),
  overContractOk: z.boolean().default(false),
  overDepositCapOk: z.boolean().default(false),
  overrideReason: optionalText(500),
};

function checkDraft(v: { kind: string; basisPct: number | null; requestedCents: number | null; lines: unknown[]; changeOrderIds: unknown[]; terms: string; termsDays: number | null; overContractOk: boolean; overDepositCapOk: boolean; overrideReason: string | null }, ctx: z.RefinementCtx) {
  if (v.kind === 'deposit' && v.basisPct === null && v.requestedCents === null) ctx.addIssue({ code: 'custom', path: ['basisPct'], message: 'Give the deposit as a percent of the contract or as an amount.' });
  if (v.kind === 'deposit' && v.basisPct !== null && v.requestedCents !== null) ctx.addIssue({ code: 'custom', path: ['requestedCents'], message: 'Give a percent or an amount, not both.' });
  if (v.kind === 'progress' && (v.basisPct === null || v.basisPct <= 0)) ctx.addIssue({ code: 'custom', path: ['basisPct'], message: 'Enter the percent complete, e.g. 60.' });
  if (v.kind === 'extra' && v.lines.length === 0 && v.changeOrderIds.length === 0) ctx.addIssue({ code: 'custom', path: ['lines'], message: 'Add at least one line.' });
  if (v.terms === 'custom' && v.termsDays === null) ctx.addIssue({ code: 'custom', path: ['termsDays'], message: 'Enter the number of days.' });
  if ((v.overContractOk || v.overDepositCapOk) && !v.overrideReason) ctx.addIssue({ code: 'custom', path: ['overrideReason'], message: 'Say why the limit does not apply here.' });
}

export const invoiceDraftInput = z.strictObject({ jobId: id, ...draftFields }).superRefine(checkDraft);
export type InvoiceDraftInput = z.output<typeof invoiceDraftInput>;
export const invoiceDraftPatch = z.strictObject(draftFields).superRefine(checkDraft);
export type InvoiceDraftPatch = z.output<typeof invoiceDraftPatch>;

export const voidInput = z.strictObject({
  reason: z.string().trim().min(3, 'Say why the invoice is void.').max(500, 'At most 500 characters.'),
  /** Make a fresh draft with the same lines to issue in its place. */
  replace: z.boolean().default(false),
});

export const paymentInput = z.strictObject({
  amountCents: positiveCents('the amount'),
  method: z.enum(MANUAL_METHODS, { message: 'Choose check, cash or bank transfer.' }),
  receivedOn: isoDate,
  reference: optionalText(120),
  /** Keep an overpayment as credit on the customer's account instead of refusing it. */
  asCredit: z.boolean().default(false),
});
export type PaymentInput = z.output<typeof paymentInput>;

export const refundInput = z.strictObject({
  amountCents: positiveCents('the refund'),
  reason: optionalText(500),
  /**
   * The asker's token for this one refund (the form makes one when it opens): sent again on
   * a retry, it finds the same request, so the card processor is asked with the same
   * idempotency key and cannot refund twice.
   */
  requestKey: z.string().regex(/^[A-Za-z0-9_-]{16,64}$/, 'A request key is 16 to 64 letters, digits, - or _.').optional(),
});
export type RefundInput = z.output<typeof refundInput>;

export const changeOrderInput = z.strictObject({
  jobId: id,
  description: z.string().trim().min(3, 'Describe the change, e.g. "Add a 4 ft walk gate".').max(500, 'At most 500 characters.'),
  priceCents: cents('the price'),
  /** Estimated cost by cost category, in cents. */
  costs: z.partialRecord(z.enum(COST_CATEGORIES), cents('the cost')).default({}),
});
export type ChangeOrderInput = z.output<typeof changeOrderInput>;

export const changeOrderDecision = z.strictObject({
  decision: z.enum(['approved', 'declined'], { message: 'Approve or decline.' }),
  /** The day the customer approved it. */
  decidedOn: isoDate,
  approvedByName: optionalText(200),
}).superRefine((v, ctx) => {
  if (v.decision === 'approved' && !v.approvedByName) ctx.addIssue({ code: 'custom', path: ['approvedByName'], message: 'Who approved it for the customer?' });
});

export const invoiceListQuery = z.strictObject({
  status: z.string().optional().transform((v) => (v ? v.split(',').filter(Boolean) : [])).pipe(z.array(z.enum([...INVOICE_STATUSES, 'overdue'] as const))),
  jobId: z.coerce.number().int().positive().optional(),
  q: z.string().trim().max(100).optional(),
});
export type InvoiceListQuery = z.output<typeof invoiceListQuery>;

export const billingSettingsInput = z.strictObject({
  depositCapPct: pct.nullish().transform((v) => v ?? null),
  depositCapCents: cents('the cap').nullish().transform((v) => v ?? null),
  defaultRetainagePct: pct,
  paymentTermsDays: z.number().int().min(0).max(365),
  invoicePrefix: z.string().trim().regex(/^[A-Z]{1,6}$/, 'One to six capital letters, e.g. INV.'),
  remindersEnabled: z.boolean(),
  reminderOffsets: z.string().trim().max(100).refine((v) => parseSchedule(v) !== null, 'Days from the due date separated by commas, e.g. -3, 0, 7, 14 (each from -60 to 365).'),
});
export type BillingSettingsInput = z.output<typeof billingSettingsInput>;

export const receivablesQuery = z.strictObject({
  bucket: z.string().optional().transform((v) => (v ? v.split(',').filter(Boolean) : [])).pipe(z.array(z.enum(['current', 'd1_30', 'd31_60', 'd61_90', 'over_90'] as const))),
  customer: z.coerce.number().int().positive().optional(),
  format: z.enum(['json', 'csv']).default('json'),
});
