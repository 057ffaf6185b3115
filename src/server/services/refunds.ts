import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import Stripe from 'stripe';
import { z } from 'zod';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { formatMoney } from '../../lib/format.ts';
import { fromStripeAmount, toStripeAmount } from '../../lib/billing/stripe-amount.ts';
import { refundSplit } from '../../lib/billing/payments.ts';
import type { RefundInput } from '../../lib/billing/schema.ts';
import { paidStatus } from '../../lib/billing/invoice.ts';
import { countsAsRefunded, laterRefundState, processorState, refundReversal, refundUndone } from '../../lib/billing/refunds.ts';
import * as repo from '../repos/invoices.ts';
import * as refundsRepo from '../repos/stripe-refunds.ts';
import { billingSettings } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { stripe } from '../payments/stripe.ts';
import { insertRefundTx } from './payments.ts';
import { getInvoice, tx } from './invoices.ts';
import { expireStaleCheckoutSessions } from './checkout-sessions.ts';

const leftOf = (p: repo.PaymentRecord) => p.appliedCents + p.creditCents - p.refundedCents;
const tooMuch = (p: repo.PaymentRecord) =>
  new AppError('RULE_BROKEN', `At most ${formatMoney(leftOf(p))} of this payment is left to refund.`, { amountCents: 'More than is left of the payment.' });

/**
 * Refunds part or all of one payment on one invoice. Everything is checked before anything
 * is done: the invoice in the address, the payment on that invoice, the amount left (the
 * permission is the route's, checked before the body is read). A check, cash or transfer
 * refund is then recorded in one transaction. A card refund is asked of Stripe outside any
 * transaction, so no row lock is held across the network: a request row is written first
 * and its id and key make the idempotency key, so a retry (the same `requestKey`, or the same
 * amount while the first has no answer yet) asks with the same key and gets the same refund;
 * the answer is recorded in a second transaction, and if the request dies before that, the
 * refund's webhook (refund.created) records it against the same row.
 */
export async function refundPayment(actor: Actor, invoiceId: number, paymentId: number, input: RefundInput) {
  const inv = await repo.findInvoice(actor.companyId, invoiceId);
  if (!inv) throw notFound('That invoice');
  const pre = await repo.findPayment(actor.companyId, paymentId);
  if (!pre || pre.invoiceId !== inv.id) throw notFound('That payment');
  if (pre.method === 'card' && pre.stripePaymentIntent) await refundByCard(actor, inv.id, pre, pre.stripePaymentIntent, input);
  else {
    if (!refundSplit(pre, input.amountCents)) throw tooMuch(pre);
    await tx(async (trx) => {
      const locked = (await repo.findInvoice(actor.companyId, inv.id, trx, true))!;
      const pay = (await repo.findPayment(actor.companyId, pre.id, trx, true))!;
      const part = refundSplit(pay, input.amountCents);
      if (!part) throw tooMuch(pay);
      await insertRefundTx(trx, actor, locked, pay, part, { amountCents: input.amountCents, reason: input.reason, stripeRefund: null });
    });
  }
  await expireStaleCheckoutSessions({ companyId: actor.companyId, invoiceId: inv.id });
  return getInvoice(actor, inv.id);
}

/** Stripe said no for good (a bad request, a card refusal): nothing was refunded, and asking again with the same key gets the same no. */
function refusedForGood(err: unknown): boolean {
  return err instanceof Stripe.errors.StripeError && (err.statusCode === 400 || err.statusCode === 402 || err.statusCode === 404) && !(err instanceof Stripe.errors.StripeIdempotencyError);
}

async function refundByCard(actor: Actor, invoiceId: number, pre: repo.PaymentRecord, intent: string, input: RefundInput): Promise<void> {
  const companyId = actor.companyId;
  if (!input.requestKey && !refundSplit(pre, input.amountCents)) throw tooMuch(pre);
  const request = await tx(async (trx) => {
    await repo.findInvoice(companyId, invoiceId, trx, true);
    const pay = (await repo.findPayment(companyId, pre.id, trx, true))!;
    const again = input.requestKey
      ? await refundsRepo.findByRequestKey(companyId, pay.id, input.requestKey, trx)
      : await refundsRepo.findUnansweredRequest(companyId, pay.id, input.amountCents, trx);
    if (again) {
      if (again.amountCents !== input.amountCents) throw new AppError('CONFLICT', `This refund was asked for ${formatMoney(again.amountCents)}; ask for another amount as a new refund.`);
      return again;
    }
    if (!refundSplit(pay, input.amountCents)) throw tooMuch(pay);
    return refundsRepo.insertStripeRefund(companyId, {
      paymentId: pay.id, invoiceId, amountCents: input.amountCents, reason: input.reason, requestedBy: actor.userId || null,
      requestKey: input.requestKey ?? randomBytes(16).toString('hex'), stripeRefund: null, status: 'requested',
    }, trx);
  });
  if (request.status === 'refused') throw new AppError('PAYMENT_PROVIDER', `The card processor refused the refund: ${request.failure ?? 'no reason given'}`);
  // Answered already (a retry after the processor's answer was recorded, here or by the webhook).
  if (request.stripeRefund) return;

  const s = await billingSettings(companyId);
  let made: Stripe.Refund;
  try {
    made = await stripe().refunds.create(
      {
        payment_intent: intent,
        amount: toStripeAmount(request.amountCents, s.currency),
        metadata: { invoice_id: String(invoiceId), organization_id: companyId, payment_id: String(pre.id), refund_request_id: String(request.id) },
      },
      { idempotencyKey: `tallypost-refund:${request.id}:${request.requestKey}` },
    );
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    if (refusedForGood(err)) {
      await tx((trx) => refundsRepo.updateStripeRefund(companyId, request.id, { status: 'refused', failure: message }, trx));
      throw new AppError('PAYMENT_PROVIDER', `The card processor refused the refund: ${message}`);
    }
    throw new AppError('PAYMENT_PROVIDER', `The card processor did not confirm the refund (${message}). Ask again: it asks for this same refund, never a second one.`);
  }
  try {
    await tx((trx) => reconcileRefundTx(trx, companyId, pre.id, processorRefund.parse(made), request.id));
  } catch (err) {
    if (err instanceof AppError) throw err;
    console.error(`[refunds] refund ${made.id} made at the processor but not saved; its webhook will record it`, err);
    throw new AppError('REFUND_UNRECORDED', 'The card processor made the refund, but it could not be saved here just now. It shows on this invoice as soon as the processor\'s notice arrives; asking again does not refund twice.');
  }
}

/**
 * A refund as Stripe reports it, from an event, a list or the create call, checked at the
 * edge. Only what the books need; Stripe sends more (tests/api/stripe-contract.test.ts).
 */
export const processorRefund = z.object({
  id: z.string().min(1).max(64),
  object: z.literal('refund'),
  amount: z.number().int().nonnegative().max(Number.MAX_SAFE_INTEGER),
  currency: z.string().length(3),
  status: z.string().max(32).nullable(),
  /** An id, or the object when the caller expanded it. */
  payment_intent: z.union([z.string().max(64), z.object({ id: z.string().max(64) })]).nullable(),
  metadata: z.record(z.string(), z.string()).nullable(),
  failure_reason: z.string().max(200).optional(),
});
export type ProcessorRefund = z.infer<typeof processorRefund>;

export const intentOf = (r: ProcessorRefund): string | null => (r.payment_intent === null ? null : typeof r.payment_intent === 'string' ? r.payment_intent : r.payment_intent.id);

/** What Tallypost writes on a refund it asks for (services/payments.ts refundPayment). */
const ourRefundMetadata = z.object({ organization_id: z.string().min(1).max(36), refund_request_id: z.string().regex(/^\d{1,15}$/) });

/** The request row a refund says it answers, when it is one of ours for this company. */
function requestIdOf(r: ProcessorRefund, companyId: string): number | null {
  const m = ourRefundMetadata.safeParse(r.metadata ?? {});
  return m.success && m.data.organization_id === companyId ? Number(m.data.refund_request_id) : null;
}

/** Whether a refund's metadata says Tallypost asked for it (any company). */
export function askedByTallypost(r: ProcessorRefund): boolean {
  return ourRefundMetadata.safeParse(r.metadata ?? {}).success;
}

export type ReconcileOutcome = 'recorded' | 'reversed' | 'unchanged' | 'not recorded: more than is left of the payment' | 'ignored: another currency' | 'ignored: another payment';

/**
 * Brings the books in line with one Stripe refund of one of our card payments, whoever made
 * it and whichever of its events (or the create call's answer) brings it: under the invoice
 * and payment locks, finds or makes its stripe_refunds row (the request it answers, found by
 * `requestId` or the refund's metadata, else a new row for a refund made at Stripe), keeps the
 * furthest state seen, and counts the refund once (a refunds row, the payment and invoice
 * figures) while that state says money is going back, or puts it back once it failed.
 * Calling it again with the same or an older state changes nothing.
 */
export async function reconcileRefundTx(trx: Knex.Transaction, companyId: string, paymentId: number, r: ProcessorRefund, requestId: number | null = null): Promise<ReconcileOutcome> {
  const found = await repo.findPayment(companyId, paymentId, trx);
  if (!found) return 'ignored: another payment';
  // Locks in the order every payment and refund path takes: invoice, payment, then the refund rows.
  const inv = (await repo.findInvoice(companyId, found.invoiceId, trx, true))!;
  const pay = (await repo.findPayment(companyId, paymentId, trx, true))!;
  const s = await billingSettings(companyId, trx);
  if (r.currency.toLowerCase() !== s.currency.toLowerCase()) return 'ignored: another currency';
  const cents = fromStripeAmount(r.amount, s.currency);

  let row = await refundsRepo.findByStripeId(r.id, trx);
  if (row && row.paymentId !== pay.id) return 'ignored: another payment';
  if (!row) {
    const asked = requestId ?? requestIdOf(r, companyId);
    const request = asked ? await refundsRepo.findById(companyId, asked, trx) : undefined;
    if (request && request.paymentId === pay.id && request.status === 'requested' && !request.stripeRefund) {
      await refundsRepo.updateStripeRefund(companyId, request.id, { stripeRefund: r.id }, trx);
      row = { ...request, stripeRefund: r.id };
    } else {
      row = await refundsRepo.insertStripeRefund(companyId, {
        paymentId: pay.id, invoiceId: inv.id, amountCents: cents, reason: 'Refunded at the card processor', requestedBy: null,
        requestKey: `processor:${r.id}`.slice(0, 64), stripeRefund: r.id, status: 'requested',
      }, trx);
    }
  }

  const state = laterRefundState(row.status, processorState(r.status));
  const failure = r.failure_reason ?? row.failure;
  const ledger = await refundsRepo.ledgerRefund(companyId, r.id, trx);
  const actor: Actor = { companyId, userId: row.requestedBy ?? '', role: 'owner' };
  let outcome: ReconcileOutcome = 'unchanged';
  if (countsAsRefunded(state) && !ledger) {
    const part = refundSplit(pay, cents);
    if (part) {
      await insertRefundTx(trx, actor, inv, pay, part, { amountCents: cents, reason: row.reason, stripeRefund: r.id });
      outcome = 'recorded';
    } else {
      // The processor never refunds more than the charge, which is the payment: this means
      // the books and Stripe disagree. Say so where the owner reads the invoice's history.
      await audit(trx, actor, 'invoice', inv.id, 'refund_unmatched', { paymentId: pay.id, amountCents: cents, stripeRefund: r.id });
      outcome = 'not recorded: more than is left of the payment';
    }
  } else if (refundUndone(state) && ledger && ledger.amountCents > 0) {
    const back = refundReversal(pay, ledger.amountCents)!;
    await refundsRepo.zeroLedgerRefund(companyId, ledger.id, `${ledger.reason ? `${ledger.reason} · ` : ''}failed at the card processor${failure ? ` (${failure})` : ''}: ${formatMoney(ledger.amountCents, s.currency)} was not returned`, trx);
    await trx('payments').where({ organization_id: companyId, id: pay.id }).update({ refunded_cents: back.refundedCents });
    const paid = inv.paidCents + back.toInvoiceCents;
    await repo.updateInvoice(companyId, inv.id, {}, null, trx, { paid_cents: paid, status: inv.status === 'void' ? 'void' : paidStatus(inv.totalCents, paid) });
    await audit(trx, actor, 'invoice', inv.id, 'refund_failed', { refundId: ledger.id, paymentId: pay.id, amountCents: ledger.amountCents, stripeRefund: r.id, failure: failure ?? null });
    outcome = 'reversed';
  }
  if (state !== row.status || failure !== row.failure || cents !== row.amountCents) {
    await refundsRepo.updateStripeRefund(companyId, row.id, { status: state, failure, amountCents: cents }, trx);
  }
  return outcome;
}

/** Most refunds a charge can have that the webhook reads back (Stripe allows many partial refunds; this is ample). */
const MAX_REFUNDS_READ = 1000;

/** A charge's refunds, read through the SDK: since API version 2022-11-15 the Charge in a charge.refunded event no longer lists them. */
export async function chargeRefunds(chargeId: string): Promise<ProcessorRefund[]> {
  const out: ProcessorRefund[] = [];
  try {
    for await (const item of stripe().refunds.list({ charge: chargeId, limit: 100 })) {
      out.push(processorRefund.parse(item));
      if (out.length >= MAX_REFUNDS_READ) break;
    }
  } catch (err) {
    throw providerUnreachable(err);
  }
  return out;
}

/** Whether a PaymentIntent carries Tallypost's metadata (it was paid through one of our invoices). */
export async function intentIsOurs(intent: string, ours: z.ZodType): Promise<boolean> {
  try {
    const pi = await stripe().paymentIntents.retrieve(intent);
    return ours.safeParse(pi.metadata ?? {}).success;
  } catch (err) {
    if (err instanceof Stripe.errors.StripeInvalidRequestError && err.code === 'resource_missing') return false;
    throw providerUnreachable(err);
  }
}

export function providerUnreachable(err: unknown): AppError {
  return new AppError('PAYMENT_PROVIDER', `The card processor could not be read just now (${err instanceof Error ? err.message : String(err)}); deliver the event again later.`);
}
