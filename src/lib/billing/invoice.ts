import { extend, percentOf, sum } from './money.ts';
import type { CurrencyCode } from '../format.ts';

export const INVOICE_KINDS = ['deposit', 'progress', 'final', 'extra'] as const;
export type InvoiceKind = (typeof INVOICE_KINDS)[number];
export const INVOICE_KIND_LABELS: Record<InvoiceKind, string> = {
  deposit: 'Deposit',
  progress: 'Progress bill',
  final: 'Final bill',
  extra: 'Extras',
};

/** Stored states; "overdue" is not one of them but read from the due date. */
export const INVOICE_STATUSES = ['draft', 'issued', 'partly_paid', 'paid', 'void'] as const;
export type InvoiceStatus = (typeof INVOICE_STATUSES)[number];
export const INVOICE_STATUS_LABELS: Record<InvoiceStatus | 'overdue', string> = {
  draft: 'Draft',
  issued: 'Sent, unpaid',
  partly_paid: 'Part paid',
  paid: 'Paid',
  void: 'Void',
  overdue: 'Overdue',
};

/**
 * The state as the customer reads it on the PDF and the pay page: whether the invoice was
 * e-mailed is the company's business, not theirs.
 */
export const CUSTOMER_STATUS_LABELS: Record<InvoiceStatus | 'overdue', string> = {
  ...INVOICE_STATUS_LABELS,
  issued: 'Due',
  partly_paid: 'Part paid, balance due',
  overdue: 'Past due',
};

/**
 * The state as staff read it: an invoice issued (numbered) but never e-mailed says so, so
 * the owner does not take it for one the customer has.
 */
export function invoiceStateLabel(status: InvoiceStatus | 'overdue', sent: boolean): string {
  return status === 'issued' && !sent ? 'Issued, not sent' : INVOICE_STATUS_LABELS[status];
}

export const LINE_CATEGORIES = ['material', 'labour', 'other'] as const;
export type LineCategory = (typeof LINE_CATEGORIES)[number];
export const LINE_CATEGORY_LABELS: Record<LineCategory, string> = { material: 'Materials', labour: 'Labour', other: 'Other' };

/** contract: a share of the contract price; change_order: an approved change order billed whole. */
export const LINE_KINDS = ['contract', 'change_order', 'extra', 'retainage_release'] as const;
export type LineKind = (typeof LINE_KINDS)[number];

export type TaxMode = 'none' | 'materials' | 'all';

export interface LineInput {
  kind: LineKind;
  category: LineCategory;
  description: string;
  /** units of the line (each, ft, hours ...), to 0.001 */
  quantity: number;
  unitPriceCents: number;
  /** Forces the tax decision for this line; otherwise the company's tax mode decides. */
  taxable?: boolean | null;
  changeOrderId?: number | null;
}

export interface Line extends LineInput {
  amountCents: number;
  taxable: boolean;
}

export interface InvoiceTotals {
  lines: Line[];
  subtotalCents: number;
  taxableCents: number;
  taxCents: number;
  /** What counts against contract plus change orders: every line but retainage released. */
  contractBilledCents: number;
  retainageHeldCents: number;
  retainageReleasedCents: number;
  /** What the customer owes on this invoice: subtotal + tax − retainage held. */
  totalCents: number;
}

export function defaultTaxable(mode: TaxMode, line: Pick<LineInput, 'kind' | 'category'>): boolean {
  if (line.kind === 'retainage_release') return false;
  if (mode === 'none') return false;
  if (mode === 'all') return true;
  return line.category === 'material';
}

/**
 * The arithmetic of one invoice. Rounding steps, each once:
 *  1. each line: quantity × unit price to the cent (half away from zero);
 *  2. sales tax: on the sum of taxable lines, rate applied once to that sum (half away from zero);
 *  3. retainage: the retainage percent of the contract and change-order lines (half away from zero).
 * Tax is charged on the whole line, retainage included: the customer is billed the tax now
 * and the held amount later without tax (the release line is never taxable).
 */
export function computeInvoice(input: { lines: LineInput[]; taxMode: TaxMode; taxRatePct: number; retainagePct: number; currency?: CurrencyCode }): InvoiceTotals {
  const cur = input.currency ?? 'USD';
  const lines: Line[] = input.lines.map((l) => ({
    ...l,
    amountCents: extend(l.quantity, l.unitPriceCents, cur),
    taxable: input.taxMode === 'none' || l.kind === 'retainage_release' ? false : (l.taxable ?? defaultTaxable(input.taxMode, l)),
  }));
  const subtotalCents = sum(lines.map((l) => l.amountCents), cur);
  const taxableCents = sum(lines.filter((l) => l.taxable).map((l) => l.amountCents), cur);
  const taxCents = input.taxMode === 'none' ? 0 : percentOf(taxableCents, input.taxRatePct, cur);
  const retainageBase = sum(lines.filter((l) => l.kind === 'contract' || l.kind === 'change_order').map((l) => l.amountCents), cur);
  const retainageHeldCents = input.retainagePct > 0 ? percentOf(retainageBase, input.retainagePct, cur) : 0;
  const retainageReleasedCents = sum(lines.filter((l) => l.kind === 'retainage_release').map((l) => l.amountCents), cur);
  const contractBilledCents = subtotalCents - retainageReleasedCents;
  return {
    lines,
    subtotalCents,
    taxableCents,
    taxCents,
    contractBilledCents,
    retainageHeldCents,
    retainageReleasedCents,
    totalCents: subtotalCents + taxCents - retainageHeldCents,
  };
}

/** INV-0042: the company's prefix and the number, four digits at least. */
export function formatInvoiceNumber(prefix: string, n: number): string {
  return `${prefix}-${String(n).padStart(4, '0')}`;
}

/** The state an issued invoice is in from what has been paid on it. */
export function paidStatus(totalCents: number, paidCents: number): Exclude<InvoiceStatus, 'draft' | 'void'> {
  if (paidCents <= 0) return 'issued';
  if (paidCents >= totalCents) return 'paid';
  return 'partly_paid';
}

export function isOverdue(inv: { status: InvoiceStatus; dueOn: string | null; balanceCents: number }, today: string): boolean {
  return (inv.status === 'issued' || inv.status === 'partly_paid') && inv.balanceCents > 0 && inv.dueOn !== null && inv.dueOn < today;
}

/** The status to show: overdue replaces sent or part paid once the due date has passed. */
export function displayStatus(inv: { status: InvoiceStatus; dueOn: string | null; balanceCents: number }, today: string): InvoiceStatus | 'overdue' {
  return isOverdue(inv, today) ? 'overdue' : inv.status;
}
