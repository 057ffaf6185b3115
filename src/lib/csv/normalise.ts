import { parseDate } from './dates.ts';
import { extendCents, formatScaled, normaliseUnit, parseDecimal, parseMoney, parseQuantity, toCents, type Scaled } from './numbers.ts';
import { normaliseHeader, type Mapping, type MappedField, type ResolvedColumns } from './mapping.ts';
import { parseTask, TIME_TASK_LABELS, TIME_TASKS, type TimeTask } from '../labour/tasks.ts';

/** One receipt line as Tallypost keeps it; money in cents, quantity as exact decimal text. */
export interface ReceiptLineValues {
  date: string;
  supplierName: string | null;
  receiptNumber: string | null;
  lineNumber: string | null;
  sku: string | null;
  description: string | null;
  /** Decimal text, in `unit`. */
  quantity: string | null;
  unit: string | null;
  /** Rounded to the cent for the price book; the line amount uses the exact price. */
  unitPriceCents: number | null;
  amountCents: number;
  taxCents: number;
  /** amount + tax: what the line cost. */
  totalCents: number;
  jobRef: string | null;
  memo: string | null;
}

export interface TimesheetLineValues {
  date: string;
  workerName: string;
  jobRef: string;
  /** Decimal text, hours. */
  hours: string;
  task: TimeTask;
  notes: string | null;
}

export type RowOutcome<T> =
  | { kind: 'line'; values: T }
  | { kind: 'blank' }
  | { kind: 'skipped'; reason: string }
  | { kind: 'error'; reason: string };

/** A cell that is only a total's label: "Total", "Subtotal", "Statement total:", "Balance due". */
const TOTAL_ROW = /^\s*(?:(?:grand|sub|statement|invoice|receipt|page|report)\s*-?\s*)?totals?(?:\s+(?:due|amount|for\b.*))?\s*:?\s*$|^\s*(?:amount|balance)\s+due\s*:?\s*$/i;
const TEXT_LIMITS: Partial<Record<MappedField, number>> = {
  supplier: 160, receiptNumber: 60, lineNumber: 20, sku: 80, description: 500, unit: 20, jobRef: 100, memo: 500, worker: 160, notes: 500, task: 60,
};

export interface RowContext {
  mapping: Mapping;
  columns: ResolvedColumns;
  headers: string[];
}

function cellOf(cells: string[], ctx: RowContext, field: MappedField): string {
  const i = ctx.columns.index[field];
  return i === undefined ? '' : (cells[i] ?? '').trim();
}

function textOf(cells: string[], ctx: RowContext, field: MappedField): string | null {
  const v = cellOf(cells, ctx, field).replace(/\s+/g, ' ');
  if (!v) return null;
  return v.slice(0, TEXT_LIMITS[field] ?? 200);
}

/** Blank rows, repeated header rows and total rows, which are reported but not lines. */
function classify(cells: string[], ctx: RowContext, itemFields: MappedField[]): RowOutcome<never> | null {
  if (cells.every((c) => !c.trim())) return { kind: 'blank' };
  if (cells.length === ctx.headers.length && cells.every((c, i) => normaliseHeader(c) === normaliseHeader(ctx.headers[i]))) {
    return { kind: 'skipped', reason: 'the header row repeated' };
  }
  const noItem = itemFields.every((f) => !cellOf(cells, ctx, f));
  const total = cells.find((c) => TOTAL_ROW.test(c));
  if (noItem && total) return { kind: 'skipped', reason: `a total row ("${total.trim().slice(0, 40)}")` };
  return null;
}

/** The row's date, or '' with the problem noted. */
function dateOf(cells: string[], ctx: RowContext, problems: string[]): string {
  const d = parseDate(cellOf(cells, ctx, 'date'), ctx.mapping.dateFormat);
  if (!d.ok) problems.push(`date: ${d.reason}`);
  else if (!d.value) problems.push('no date');
  return d.ok && d.value ? d.value : '';
}

/** One CSV row of a receipt file → a line, a skipped row, or an error with a plain reason. */
export function normaliseReceiptRow(cells: string[], ctx: RowContext): RowOutcome<ReceiptLineValues> {
  const skip = classify(cells, ctx, ['sku', 'quantity']);
  if (skip) return skip;
  const { mapping: m } = ctx;
  const problems: string[] = [];
  const date = dateOf(cells, ctx, problems);

  const money = (field: MappedField): Scaled | null => {
    const raw = cellOf(cells, ctx, field);
    const p = parseMoney(raw, m.decimal);
    if (!p.ok) { problems.push(`${field === 'unitPrice' ? 'unit price' : field}: ${p.reason}`); return null; }
    return p.value;
  };
  const q = parseQuantity(cellOf(cells, ctx, 'quantity'), m.decimal);
  if (!q.ok) problems.push(`quantity: ${q.reason}`);
  const qty = q.ok ? q.value : null;
  const price = money('unitPrice');
  const amount = money('amount');
  const tax = money('tax');
  let amountCents: number | null = amount ? toCents(amount) : null;
  if (amountCents === null && !problems.some((p) => /^(amount|unit price|quantity):/.test(p))) {
    if (qty && price) {
      amountCents = extendCents(qty.value, price);
      if (amountCents === null) problems.push('amount: quantity × unit price is too large');
    } else problems.push('no line amount (and no quantity with a unit price to work it out)');
  }
  if (problems.length) return { kind: 'error', reason: problems.join('; ') };
  // A returned quantity written as a positive amount is still a credit.
  if (qty && qty.value.units < 0 && amountCents! > 0) amountCents = -amountCents!;
  // The tax on a credit comes back with it, even when the receipt prints it positive
  // (common practice, no source): a return never adds tax to the cost.
  let taxCents = tax ? toCents(tax) : 0;
  if (amountCents! < 0 && taxCents > 0) taxCents = -taxCents;
  const total = amountCents! + taxCents;
  if (!Number.isSafeInteger(total) || Math.abs(total) >= 1e13) return { kind: 'error', reason: 'amount: too large for one line' };
  return {
    kind: 'line',
    values: {
      date,
      supplierName: textOf(cells, ctx, 'supplier'),
      receiptNumber: textOf(cells, ctx, 'receiptNumber'),
      lineNumber: textOf(cells, ctx, 'lineNumber'),
      sku: textOf(cells, ctx, 'sku'),
      description: textOf(cells, ctx, 'description'),
      quantity: qty ? formatScaled(qty.value) : null,
      unit: normaliseUnit(textOf(cells, ctx, 'unit')) ?? qty?.unit ?? null,
      unitPriceCents: price ? toCents(price) : null,
      amountCents: amountCents!,
      taxCents,
      totalCents: total,
      jobRef: textOf(cells, ctx, 'jobRef'),
      memo: textOf(cells, ctx, 'memo'),
    },
  };
}

/** Most hours one entry may carry: one person's day. */
export const MAX_ENTRY_HOURS = 24;

/** One CSV row of a timesheet → a line or an error. */
export function normaliseTimesheetRow(cells: string[], ctx: RowContext): RowOutcome<TimesheetLineValues> {
  const skip = classify(cells, ctx, ['worker', 'hours']);
  if (skip) return skip;
  const { mapping: m } = ctx;
  const problems: string[] = [];
  const date = dateOf(cells, ctx, problems);
  const worker = textOf(cells, ctx, 'worker');
  if (!worker) problems.push('no worker');
  const jobRef = textOf(cells, ctx, 'jobRef');
  if (!jobRef) problems.push('no job code');
  const rawHours = cellOf(cells, ctx, 'hours').replace(/\s*h(ou)?rs?\.?$/i, '');
  const h = parseDecimal(rawHours, m.decimal);
  let hours: string | null = null;
  if (!rawHours) problems.push('no hours');
  else if (!h.ok) problems.push(`hours: ${h.reason}`);
  else if (h.value.scale > 2) problems.push(`hours: "${rawHours}" has more than two decimals`);
  else if (h.value.units <= 0 || h.value.units / 10 ** h.value.scale > MAX_ENTRY_HOURS) problems.push(`hours: ${rawHours} is not between 0 and ${MAX_ENTRY_HOURS}`);
  else hours = formatScaled(h.value);
  const rawTask = cellOf(cells, ctx, 'task');
  const task = rawTask ? parseTask(rawTask) : 'travel_other';
  if (!task) problems.push(`task: "${rawTask}" is not one of ${TIME_TASKS.map((t) => TIME_TASK_LABELS[t]).join(', ')}`);
  if (problems.length) return { kind: 'error', reason: problems.join('; ') };
  return { kind: 'line', values: { date, workerName: worker!, jobRef: jobRef!, hours: hours!, task: task!, notes: textOf(cells, ctx, 'notes') } };
}
