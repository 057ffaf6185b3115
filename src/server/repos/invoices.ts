import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { InvoiceKind, InvoiceStatus, InvoiceTotals, Line, LineCategory, LineKind, TaxMode } from '../../lib/billing/invoice.ts';
import type { Terms } from '../../lib/billing/terms.ts';
import type { PaymentMethod } from '../../lib/billing/payments.ts';

type Q = Knex | Knex.Transaction;

export interface InvoiceRowInput {
  jobId: number;
  customerId: number;
  kind: InvoiceKind;
  terms: Terms;
  termsDays: number;
  notes: string | null;
  taxMode: TaxMode;
  taxRatePct: number;
  basisPct: number | null;
  requestedCents: number | null;
  retainagePct: number;
  overContractOk: boolean;
  overDepositCapOk: boolean;
  overrideReason: string | null;
  replacesInvoiceId?: number | null;
}

/** An invoice's computed amounts, as computeInvoice returns them. */
export type Totals = Omit<InvoiceTotals, 'lines'>;

export interface InvoiceRecord extends Omit<InvoiceRowInput, 'replacesInvoiceId'>, Totals {
  id: number;
  companyId: string;
  status: InvoiceStatus;
  number: number | null;
  numberText: string | null;
  issuedOn: string | null;
  dueOn: string | null;
  paidCents: number;
  balanceCents: number;
  publicNonce: string;
  voidReason: string | null;
  voidedAt: string | null;
  replacesInvoiceId: number | null;
  sentAt: string | null;
  sendCount: number;
  createdAt: string;
}

const num = (v: unknown) => (v == null ? null : Number(v));
const iso = (v: unknown) => (v ? new Date(v as string).toISOString() : null);

export function fromRow(r: Record<string, unknown>): InvoiceRecord {
  const total = toInt(r.total_cents);
  const paid = toInt(r.paid_cents);
  return {
    id: Number(r.id),
    companyId: String(r.organization_id),
    jobId: Number(r.job_id),
    customerId: Number(r.customer_id),
    kind: r.kind as InvoiceKind,
    status: r.status as InvoiceStatus,
    number: num(r.number),
    numberText: (r.number_text as string) ?? null,
    issuedOn: (r.issued_on as string) ?? null,
    dueOn: (r.due_on as string) ?? null,
    terms: r.terms as Terms,
    termsDays: Number(r.terms_days),
    notes: (r.notes as string) ?? null,
    taxMode: r.tax_mode as TaxMode,
    taxRatePct: Number(r.tax_rate_pct),
    basisPct: num(r.basis_pct),
    requestedCents: r.requested_cents == null ? null : toInt(r.requested_cents),
    retainagePct: Number(r.retainage_pct),
    subtotalCents: toInt(r.subtotal_cents),
    taxableCents: toInt(r.taxable_cents),
    taxCents: toInt(r.tax_cents),
    contractBilledCents: toInt(r.contract_billed_cents),
    retainageHeldCents: toInt(r.retainage_held_cents),
    retainageReleasedCents: toInt(r.retainage_released_cents),
    totalCents: total,
    paidCents: paid,
    balanceCents: r.status === 'void' || r.status === 'draft' ? 0 : total - paid,
    overContractOk: Boolean(r.over_contract_ok),
    overDepositCapOk: Boolean(r.over_deposit_cap_ok),
    overrideReason: (r.override_reason as string) ?? null,
    publicNonce: String(r.public_nonce),
    voidReason: (r.void_reason as string) ?? null,
    voidedAt: iso(r.voided_at),
    replacesInvoiceId: num(r.replaces_invoice_id),
    sentAt: iso(r.sent_at),
    sendCount: Number(r.send_count ?? 0),
    createdAt: iso(r.created_at) ?? '',
  };
}

export async function findInvoice(companyId: string, id: number, q: Q = db(), lock = false): Promise<InvoiceRecord | undefined> {
  const b = q('invoices').where({ organization_id: companyId, id }).first();
  if (lock) b.forUpdate();
  const r = await b;
  return r ? fromRow(r) : undefined;
}

/** For the customer's link: the invoice by id and its random nonce (the link's HMAC was checked first). */
export async function findByPublicNonce(id: number, nonce: string, q: Q = db()): Promise<InvoiceRecord | undefined> {
  const r = await q('invoices').where({ id, public_nonce: nonce }).whereNot('status', 'draft').first();
  return r ? fromRow(r) : undefined;
}

export interface InvoiceListRow extends InvoiceRecord {
  jobCode: string;
  jobTitle: string;
  customerName: string;
}

export async function listInvoices(companyId: string, f: { jobId?: number; statuses?: InvoiceStatus[]; q?: string }, q: Q = db()): Promise<InvoiceListRow[]> {
  const b = q('invoices as i')
    .join('jobs as j', function () { this.on('j.id', 'i.job_id').andOn('j.organization_id', 'i.organization_id'); })
    .join('customers as c', function () { this.on('c.id', 'i.customer_id').andOn('c.organization_id', 'i.organization_id'); })
    .where('i.organization_id', companyId)
    .select('i.*', 'j.code as job_code', 'j.title as job_title', 'c.name as customer_name')
    .orderByRaw('i.number IS NULL DESC, i.number DESC, i.id DESC')
    .limit(2000);
  if (f.jobId) b.andWhere('i.job_id', f.jobId);
  if (f.statuses?.length) b.whereIn('i.status', f.statuses);
  if (f.q) {
    const like = `%${f.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    b.andWhere((w) => w.whereILike('i.number_text', like).orWhereILike('j.code', like).orWhereILike('j.title', like).orWhereILike('c.name', like));
  }
  return (await b).map((r) => ({ ...fromRow(r), jobCode: r.job_code, jobTitle: r.job_title, customerName: r.customer_name }));
}

function inputRow(v: Partial<InvoiceRowInput>): Record<string, unknown> {
  const map: Record<string, string> = {
    jobId: 'job_id', customerId: 'customer_id', kind: 'kind', terms: 'terms', termsDays: 'terms_days', notes: 'notes', taxMode: 'tax_mode',
    taxRatePct: 'tax_rate_pct', basisPct: 'basis_pct', requestedCents: 'requested_cents', retainagePct: 'retainage_pct', overContractOk: 'over_contract_ok',
    overDepositCapOk: 'over_deposit_cap_ok', overrideReason: 'override_reason', replacesInvoiceId: 'replaces_invoice_id',
  };
  const out: Record<string, unknown> = {};
  for (const [k, col] of Object.entries(map)) if (k in v) out[col] = (v as Record<string, unknown>)[k];
  return out;
}

function totalsRow(t: Totals): Record<string, number> {
  return {
    subtotal_cents: t.subtotalCents, taxable_cents: t.taxableCents, tax_cents: t.taxCents, contract_billed_cents: t.contractBilledCents,
    retainage_held_cents: t.retainageHeldCents, retainage_released_cents: t.retainageReleasedCents, total_cents: t.totalCents,
  };
}

export async function insertInvoice(companyId: string, v: InvoiceRowInput, totals: Totals, nonce: string, createdBy: string, trx: Knex.Transaction): Promise<number> {
  const [id] = await trx('invoices').insert({ organization_id: companyId, ...inputRow(v), ...totalsRow(totals), status: 'draft', public_nonce: nonce, created_by: createdBy || null });
  return Number(id);
}

export async function updateInvoice(companyId: string, id: number, v: Partial<InvoiceRowInput>, totals: Totals | null, trx: Knex.Transaction, extra: Record<string, unknown> = {}): Promise<void> {
  await trx('invoices').where({ organization_id: companyId, id }).update({ ...inputRow(v), ...(totals ? totalsRow(totals) : {}), ...extra, updated_at: trx.fn.now(3) });
}

export async function replaceLines(companyId: string, invoiceId: number, lines: Line[], trx: Knex.Transaction): Promise<void> {
  // Delete by primary key: a DELETE by invoice_id on a new invoice would gap-lock the index
  // and deadlock with other drafts being written at the same moment.
  const old = await trx('invoice_lines').where({ organization_id: companyId, invoice_id: invoiceId }).pluck('id');
  if (old.length) await trx('invoice_lines').whereIn('id', old).delete();
  if (!lines.length) return;
  await trx('invoice_lines').insert(
    lines.map((l, i) => ({
      organization_id: companyId, invoice_id: invoiceId, position: i + 1, kind: l.kind, category: l.category, description: l.description,
      quantity: l.quantity, unit_price_cents: l.unitPriceCents, amount_cents: l.amountCents, taxable: l.taxable, change_order_id: l.changeOrderId ?? null,
    })),
  );
}

export async function invoiceLines(companyId: string, invoiceId: number, q: Q = db()): Promise<Line[]> {
  const rows = await q('invoice_lines').where({ organization_id: companyId, invoice_id: invoiceId }).orderBy('position');
  return rows.map((r) => ({
    kind: r.kind as LineKind, category: r.category as LineCategory, description: r.description, quantity: Number(r.quantity),
    unitPriceCents: toInt(r.unit_price_cents), amountCents: toInt(r.amount_cents), taxable: Boolean(r.taxable), changeOrderId: num(r.change_order_id),
  }));
}

const ISSUED = ['issued', 'partly_paid', 'paid'];

/** What the job's issued invoices (void excluded, one invoice left out) have billed so far. */
export async function jobBilled(companyId: string, jobId: number, exceptInvoiceId: number | null, q: Q = db()) {
  const b = q('invoices').where({ organization_id: companyId, job_id: jobId }).whereIn('status', ISSUED);
  if (exceptInvoiceId) b.whereNot('id', exceptInvoiceId);
  const r = await b
    .sum({ billed: 'contract_billed_cents', held: 'retainage_held_cents', released: 'retainage_released_cents', total: 'total_cents', paid: 'paid_cents', tax: 'tax_cents' })
    .first();
  return {
    billedBeforeCents: toInt(r?.billed), retainageHeldCents: toInt(r?.held), retainageReleasedCents: toInt(r?.released),
    invoicedCents: toInt(r?.total), paidCents: toInt(r?.paid), taxCents: toInt(r?.tax),
  };
}

/** The job's estimated cost split into materials and the rest (for tax on materials only). */
export async function jobEstimateSplit(companyId: string, jobId: number, q: Q = db()): Promise<{ materialCents: number; otherCents: number }> {
  const rows: { category: string; s: unknown }[] = await q('job_estimates').where({ organization_id: companyId, job_id: jobId }).groupBy('category').select('category').sum({ s: 'amount_cents' });
  let materialCents = 0;
  let otherCents = 0;
  for (const r of rows) {
    if (r.category === 'material') materialCents += toInt(r.s);
    else otherCents += toInt(r.s);
  }
  return { materialCents, otherCents };
}

/** Change orders already on an invoice that is not void (the given one excepted). */
export async function changeOrdersOnOtherInvoices(companyId: string, ids: number[], exceptInvoiceId: number | null, q: Q = db()): Promise<number[]> {
  if (!ids.length) return [];
  const b = q('invoice_lines as l')
    .join('invoices as i', function () { this.on('i.id', 'l.invoice_id').andOn('i.organization_id', 'l.organization_id'); })
    .where('l.organization_id', companyId)
    .whereIn('l.change_order_id', ids)
    .whereNot('i.status', 'void')
    .distinct('l.change_order_id');
  if (exceptInvoiceId) b.whereNot('i.id', exceptInvoiceId);
  return (await b).map((r) => Number(r.change_order_id));
}

/** Takes the next invoice number under the company row's lock; the caller's transaction issues it. */
export async function takeInvoiceNumber(companyId: string, trx: Knex.Transaction): Promise<{ number: number; prefix: string }> {
  const row = await trx('company_settings').where('organization_id', companyId).forUpdate().first('next_invoice_number', 'invoice_prefix');
  const n = Number(row?.next_invoice_number ?? 1);
  await trx('company_settings').where('organization_id', companyId).update({ next_invoice_number: n + 1 });
  return { number: n, prefix: String(row?.invoice_prefix ?? 'INV') };
}

export interface PaymentRecord {
  id: number;
  invoiceId: number;
  method: PaymentMethod;
  amountCents: number;
  appliedCents: number;
  creditCents: number;
  refundedCents: number;
  receivedOn: string;
  reference: string | null;
  stripePaymentIntent: string | null;
  recordedBy: string | null;
  createdAt: string;
}

function paymentFromRow(r: Record<string, unknown>): PaymentRecord {
  return {
    id: Number(r.id), invoiceId: Number(r.invoice_id), method: r.method as PaymentMethod, amountCents: toInt(r.amount_cents), appliedCents: toInt(r.applied_cents),
    creditCents: toInt(r.credit_cents), refundedCents: toInt(r.refunded_cents), receivedOn: String(r.received_on), reference: (r.reference as string) ?? null,
    stripePaymentIntent: (r.stripe_payment_intent as string) ?? null, recordedBy: (r.recorded_by as string) ?? null, createdAt: iso(r.created_at) ?? '',
  };
}

export async function invoicePayments(companyId: string, invoiceId: number, q: Q = db()): Promise<PaymentRecord[]> {
  return (await q('payments').where({ organization_id: companyId, invoice_id: invoiceId }).orderBy('id')).map(paymentFromRow);
}

export async function findPayment(companyId: string, id: number, q: Q = db(), lock = false): Promise<PaymentRecord | undefined> {
  const b = q('payments').where({ organization_id: companyId, id }).first();
  if (lock) b.forUpdate();
  const r = await b;
  return r ? paymentFromRow(r) : undefined;
}

/** With lock, a locking read: it sees rows committed after the caller's snapshot was taken. */
export async function findPaymentByIntent(intent: string, q: Q = db(), lock = false): Promise<PaymentRecord | undefined> {
  const b = q('payments').where({ stripe_payment_intent: intent }).first();
  if (lock) b.forUpdate();
  const r = await b;
  return r ? paymentFromRow(r) : undefined;
}

export async function insertPayment(companyId: string, inv: InvoiceRecord, p: { method: PaymentMethod; amountCents: number; appliedCents: number; creditCents: number; receivedOn: string; reference: string | null; stripePaymentIntent?: string | null; stripeCheckoutSession?: string | null; recordedBy: string | null }, trx: Knex.Transaction): Promise<number> {
  const [id] = await trx('payments').insert({
    organization_id: companyId, invoice_id: inv.id, job_id: inv.jobId, customer_id: inv.customerId, method: p.method, amount_cents: p.amountCents,
    applied_cents: p.appliedCents, credit_cents: p.creditCents, received_on: p.receivedOn, reference: p.reference,
    stripe_payment_intent: p.stripePaymentIntent ?? null, stripe_checkout_session: p.stripeCheckoutSession ?? null, recorded_by: p.recordedBy || null,
  });
  return Number(id);
}

export interface RefundRecord {
  id: number;
  paymentId: number;
  amountCents: number;
  reason: string | null;
  stripeRefund: string | null;
  refundedOn: string;
}

export async function invoiceRefunds(companyId: string, invoiceId: number, q: Q = db()): Promise<RefundRecord[]> {
  const rows = await q('refunds').where({ organization_id: companyId, invoice_id: invoiceId }).orderBy('id');
  return rows.map((r) => ({ id: Number(r.id), paymentId: Number(r.payment_id), amountCents: toInt(r.amount_cents), reason: r.reason ?? null, stripeRefund: r.stripe_refund ?? null, refundedOn: String(r.refunded_on) }));
}

/** Open invoices (sent, part paid) with a balance, for receivables and reminders. */
export async function openInvoices(companyId: string, q: Q = db()) {
  const rows = await q('invoices as i')
    .join('jobs as j', function () { this.on('j.id', 'i.job_id').andOn('j.organization_id', 'i.organization_id'); })
    .join('customers as c', function () { this.on('c.id', 'i.customer_id').andOn('c.organization_id', 'i.organization_id'); })
    .where('i.organization_id', companyId)
    .whereIn('i.status', ['issued', 'partly_paid'])
    .whereRaw('i.total_cents > i.paid_cents')
    .orderBy('i.due_on')
    .select('i.*', 'j.code as job_code', 'j.title as job_title', 'c.name as customer_name', 'c.email as customer_email');
  return rows.map((r) => ({ ...fromRow(r), jobCode: String(r.job_code), jobTitle: String(r.job_title), customerName: String(r.customer_name), customerEmail: (r.customer_email as string) ?? null }));
}

/** Credit on a customer's account: per payment, the excess kept as credit less what was refunded off it. */
export async function customerCredit(companyId: string, customerId: number, q: Q = db()): Promise<number> {
  const r = await q('payments').where({ organization_id: companyId, customer_id: customerId }).select(q.raw('SUM(GREATEST(credit_cents - refunded_cents, 0)) AS c')).first();
  return toInt(r?.c);
}
