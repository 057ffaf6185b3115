import type { Knex } from 'knex';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { applyPayment, PAYMENT_METHOD_LABELS, type PaymentMethod } from '../../lib/billing/payments.ts';
import { paidStatus } from '../../lib/billing/invoice.ts';
import { formatMoney } from '../../lib/format.ts';
import type { PaymentInput } from '../../lib/billing/schema.ts';
import * as repo from '../repos/invoices.ts';
import { billingSettings, todayIn } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { enqueueMail } from '../mail/outbox.ts';
import { receiptMail } from './billing-mail.ts';
import { invoiceUrl } from './invoice-links.ts';
import { getInvoice, tx } from './invoices.ts';
import { expireStaleCheckoutSessions } from './checkout-sessions.ts';

/** The one way a payment lands, manual or by card: under the invoice's row lock. */
export async function landPaymentTx(
  trx: Knex.Transaction,
  actor: Actor,
  invoiceId: number,
  p: { method: PaymentMethod; amountCents: number; receivedOn: string; reference: string | null; asCredit: boolean; stripePaymentIntent?: string; stripeCheckoutSession?: string | null },
  opts: { mail?: boolean } = {},
): Promise<{ paymentId: number; created: boolean }> {
  const inv = await repo.findInvoice(actor.companyId, invoiceId, trx, true);
  if (!inv) throw notFound('That invoice');
  if (p.stripePaymentIntent) {
    // Checked under the invoice lock, with a locking read (not the transaction's older
    // snapshot): a second event for the same payment finds the first's row.
    const seen = await repo.findPaymentByIntent(p.stripePaymentIntent, trx, true);
    if (seen) return { paymentId: seen.id, created: false };
  }
  const open = inv.status === 'issued' || inv.status === 'partly_paid';
  // Money already taken by card is never refused: whatever exceeds the balance (all of it,
  // on an invoice voided meanwhile) is credit on the customer's account.
  const card = p.method === 'card' && (inv.status === 'paid' || inv.status === 'void');
  const a = applyPayment({ totalCents: inv.status === 'void' ? inv.paidCents : inv.totalCents, paidCents: inv.paidCents, amountCents: p.amountCents, asCredit: p.asCredit, open: open || card });
  if (!a.ok) {
    if (a.reason === 'NOT_OPEN') throw new AppError('RULE_BROKEN', inv.status === 'draft' ? 'Issue the invoice before recording payments on it.' : `Invoice ${inv.numberText} is ${inv.status === 'void' ? 'void' : 'paid in full'}; no more payments go on it.`);
    if (a.reason === 'OVERPAYMENT') {
      throw new AppError('OVERPAYMENT', `That is ${formatMoney(p.amountCents - a.balanceCents)} more than the ${formatMoney(a.balanceCents)} still owed on ${inv.numberText}. Enter the balance or less, or keep the difference as credit on the customer's account.`, { amountCents: `At most ${formatMoney(a.balanceCents)}, unless kept as credit.` });
    }
    throw new AppError('BAD_INPUT', 'Enter an amount above zero.', { amountCents: 'Enter an amount above zero.' });
  }
  const paymentId = await repo.insertPayment(actor.companyId, inv, {
    method: p.method, amountCents: p.amountCents, appliedCents: a.appliedCents, creditCents: a.creditCents, receivedOn: p.receivedOn, reference: p.reference,
    stripePaymentIntent: p.stripePaymentIntent ?? null, stripeCheckoutSession: p.stripeCheckoutSession ?? null, recordedBy: actor.userId,
  }, trx);
  const paid = inv.paidCents + a.appliedCents;
  await repo.updateInvoice(actor.companyId, inv.id, {}, null, trx, { paid_cents: paid, status: inv.status === 'void' ? 'void' : paidStatus(inv.totalCents, paid) });
  await audit(trx, actor, 'invoice', inv.id, 'payment', { paymentId, method: p.method, amountCents: p.amountCents, appliedCents: a.appliedCents, creditCents: a.creditCents, reference: p.reference });
  if (opts.mail !== false) await queueReceipt(trx, actor.companyId, inv, paymentId, p, paid);
  return { paymentId, created: true };
}

async function queueReceipt(trx: Knex.Transaction, companyId: string, inv: repo.InvoiceRecord, paymentId: number, p: { method: PaymentMethod; amountCents: number; receivedOn: string }, paid: number) {
  const cust = await trx('customers').where({ organization_id: companyId, id: inv.customerId }).first('name', 'email');
  if (!cust?.email) return;
  const job = await trx('jobs').where({ organization_id: companyId, id: inv.jobId }).first('title');
  const s = await billingSettings(companyId, trx);
  await enqueueMail(trx, {
    organizationId: companyId,
    ...receiptMail({
      to: cust.email, company: s.companyName, customerName: cust.name, numberText: inv.numberText ?? '', jobTitle: job?.title ?? '', totalCents: inv.totalCents,
      balanceCents: Math.max(0, inv.totalCents - paid), dueOn: inv.dueOn, url: invoiceUrl(inv.id, inv.publicNonce), currency: s.currency,
      paidCents: p.amountCents, method: PAYMENT_METHOD_LABELS[p.method], receivedOn: p.receivedOn,
    }),
    dedupeKey: `receipt:payment:${paymentId}`,
  });
}

export async function recordPayment(actor: Actor, invoiceId: number, input: PaymentInput) {
  const s = await billingSettings(actor.companyId);
  if (input.receivedOn > todayIn(s.timezone)) throw new AppError('BAD_INPUT', 'Some fields need attention.', { receivedOn: 'A payment cannot be received in the future.' });
  const r = await tx((trx) => landPaymentTx(trx, actor, invoiceId, { ...input, reference: input.reference }));
  // A hosted card page made for the old balance must not take money any more.
  await expireStaleCheckoutSessions({ companyId: actor.companyId, invoiceId });
  return { paymentId: r.paymentId, invoice: await getInvoice(actor, invoiceId) };
}

export async function insertRefundTx(trx: Knex.Transaction, actor: Actor, inv: repo.InvoiceRecord, pay: repo.PaymentRecord, part: { fromCreditCents: number; fromInvoiceCents: number }, r: { amountCents: number; reason: string | null; stripeRefund: string | null }) {
  const s = await billingSettings(actor.companyId, trx);
  const [id] = await trx('refunds').insert({
    organization_id: actor.companyId, payment_id: pay.id, invoice_id: inv.id, job_id: inv.jobId, amount_cents: r.amountCents, reason: r.reason,
    stripe_refund: r.stripeRefund, refunded_on: todayIn(s.timezone), created_by: actor.userId || null,
  });
  await trx('payments').where({ organization_id: actor.companyId, id: pay.id }).update({ refunded_cents: pay.refundedCents + r.amountCents });
  const paid = inv.paidCents - part.fromInvoiceCents;
  await repo.updateInvoice(actor.companyId, inv.id, {}, null, trx, { paid_cents: paid, status: inv.status === 'void' ? 'void' : paidStatus(inv.totalCents, paid) });
  await audit(trx, actor, 'invoice', inv.id, 'refund', { refundId: Number(id), paymentId: pay.id, amountCents: r.amountCents, reason: r.reason, stripeRefund: r.stripeRefund });
}
