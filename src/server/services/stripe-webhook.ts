import type Stripe from 'stripe';
import { z } from 'zod';
import type { Actor } from '../http.ts';
import { AppError } from '../../lib/errors.ts';
import { fromStripeAmount } from '../../lib/billing/stripe-amount.ts';
import * as repo from '../repos/invoices.ts';
import { billingSettings, todayIn } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { db } from '../db.ts';
import { verifyWebhook } from '../payments/stripe.ts';
import { landPaymentTx } from './payments.ts';
import { tx } from './invoices.ts';
import { askedByTallypost, chargeRefunds, intentIsOurs, intentOf, processorRefund, reconcileRefundTx, type ProcessorRefund, type ReconcileOutcome } from './refunds.ts';
import { bumpDataVersion } from '../report-cache.ts';
import { expireStaleCheckoutSessions, markCheckoutSession } from './checkout-sessions.ts';

/** What Tallypost put in the metadata when it made the checkout session; refused unless it reads back exactly. */
const metadata = z.object({ invoice_id: z.string().regex(/^\d{1,15}$/), organization_id: z.string().min(1).max(36) });

const system = (companyId: string): Actor => ({ companyId, userId: '', role: 'owner' });

type Outcome = { status: number; body: { received: true; outcome: string } };

/** Events whose object is a Refund. charge.refund.updated is the older name of refund.updated; taken alike if it comes. */
const REFUND_EVENTS = new Set(['refund.created', 'refund.updated', 'refund.failed', 'charge.refund.updated']);

/** The charge.refunded object as far as it is read: since API version 2022-11-15 it carries no refunds. */
const refundedCharge = z.object({ id: z.string().min(1).max(64), object: z.literal('charge'), payment_intent: z.union([z.string().max(64), z.null()]) });

/**
 * What a refund event needs from the card processor, read before the transaction opens so no
 * lock waits on the network: the refunds themselves (a refund event's own object; for
 * charge.refunded the charge's refunds listed through the SDK), or, for a payment not
 * recorded here yet, whether its PaymentIntent is one of ours (then the event is refused so
 * Stripe delivers it again once the payment has landed).
 */
type Prefetched = { intent: string | null; refunds: ProcessorRefund[] | null; ours: boolean } | null;

async function prefetch(event: Stripe.Event): Promise<Prefetched> {
  const obj = event.data.object as unknown;
  if (REFUND_EVENTS.has(event.type)) {
    const r = processorRefund.safeParse(obj);
    if (!r.success) return { intent: null, refunds: [], ours: false };
    const intent = intentOf(r.data);
    if (!intent) return { intent: null, refunds: [r.data], ours: false };
    if (await repo.findPaymentByIntent(intent)) return { intent, refunds: [r.data], ours: true };
    return { intent, refunds: [r.data], ours: askedByTallypost(r.data) || (await intentIsOurs(intent, metadata)) };
  }
  if (event.type === 'charge.refunded') {
    const ch = refundedCharge.safeParse(obj);
    if (!ch.success || !ch.data.payment_intent) return { intent: null, refunds: [], ours: false };
    const intent = ch.data.payment_intent;
    if (await repo.findPaymentByIntent(intent)) return { intent, refunds: await chargeRefunds(ch.data.id), ours: true };
    return { intent, refunds: null, ours: await intentIsOurs(intent, metadata) };
  }
  return null;
}

/**
 * The webhook: verify the raw body, store the event id, act on it once. The event row and
 * its effect commit together, so a replay (or a second delivery racing the first) finds the
 * id and changes nothing, and a payment is recorded once whichever of its events comes first.
 */
export async function handleStripeWebhook(raw: Buffer, signature: string | null): Promise<Outcome> {
  const v = verifyWebhook(raw, signature);
  if (!v.ok) throw new AppError('BAD_SIGNATURE', `Webhook refused: ${v.reason}`);
  const event = v.event;
  // A replay changes nothing, so it need not ask the card processor anything either.
  if (await db()('stripe_events').where('id', event.id).first('id')) return { status: 200, body: { received: true, outcome: 'already handled' } };
  const pre = await prefetch(event);
  // The event row is inserted first: a second delivery of the same id waits on it and then
  // finds it taken; nothing else is locked before the invoice row.
  const outcome = await tx(async (trx) => {
    try {
      await trx('stripe_events').insert({ id: event.id, type: event.type, outcome: 'processing' });
    } catch (err) {
      if ((err as { code?: string }).code === 'ER_DUP_ENTRY') return 'already handled';
      throw err;
    }
    const result = await apply(trx, event, pre);
    await trx('stripe_events').where('id', event.id).update({ organization_id: result.companyId, invoice_id: result.invoiceId, outcome: result.outcome.slice(0, 200) });
    return result;
  });
  if (typeof outcome === 'string') return { status: 200, body: { received: true, outcome } };
  // What the reports show may have changed (a payment, a refund).
  if (outcome.companyId) await bumpDataVersion(outcome.companyId).catch(() => undefined);
  // Paid in full by card: any other hosted page still open for this invoice is closed.
  if (outcome.companyId && outcome.invoiceId) await expireStaleCheckoutSessions({ companyId: outcome.companyId, invoiceId: outcome.invoiceId });
  return { status: 200, body: { received: true, outcome: outcome.outcome } };
}

interface Applied { companyId: string | null; invoiceId: number | null; outcome: string }

async function apply(trx: import('knex').Knex.Transaction, event: Stripe.Event, pre: Prefetched): Promise<Applied> {
  const obj = event.data.object as unknown as Record<string, unknown>;
  const meta = metadata.safeParse(obj.metadata ?? {});
  switch (event.type) {
    case 'checkout.session.completed':
    case 'checkout.session.async_payment_succeeded':
    case 'payment_intent.succeeded': {
      if (!meta.success) return { companyId: null, invoiceId: null, outcome: 'ignored: not a Tallypost payment' };
      const companyId = meta.data.organization_id;
      const invoiceId = Number(meta.data.invoice_id);
      const isSession = event.type.startsWith('checkout.session');
      if (isSession && obj.payment_status !== 'paid') return { companyId: null, invoiceId: null, outcome: 'ignored: session not paid yet' };
      const intent = String(isSession ? obj.payment_intent : obj.id);
      const amount = Number(isSession ? obj.amount_total : (obj.amount_received ?? obj.amount));
      const inv = await repo.findInvoice(companyId, invoiceId, trx);
      if (!inv || !intent || !Number.isSafeInteger(amount) || amount <= 0) return { companyId: null, invoiceId: null, outcome: 'ignored: no such invoice' };
      const s = await billingSettings(companyId, trx);
      if (isSession) await markCheckoutSession(companyId, String(obj.id), 'complete', trx);
      const r = await landPaymentTx(trx, system(companyId), invoiceId, {
        method: 'card', amountCents: fromStripeAmount(amount, s.currency), receivedOn: todayIn(s.timezone, new Date(event.created * 1000)),
        reference: intent, asCredit: true, stripePaymentIntent: intent, stripeCheckoutSession: isSession ? String(obj.id) : null,
      });
      return { companyId, invoiceId, outcome: r.created ? `payment ${r.paymentId} recorded` : `payment ${r.paymentId} already recorded` };
    }
    case 'payment_intent.payment_failed': {
      if (!meta.success) return { companyId: null, invoiceId: null, outcome: 'ignored: not a Tallypost payment' };
      const companyId = meta.data.organization_id;
      const invoiceId = Number(meta.data.invoice_id);
      if (!(await repo.findInvoice(companyId, invoiceId, trx))) return { companyId: null, invoiceId: null, outcome: 'ignored: no such invoice' };
      const err = (obj.last_payment_error ?? {}) as { message?: string; decline_code?: string };
      await audit(trx, system(companyId), 'invoice', invoiceId, 'card_declined', { message: err.message ?? 'The card was declined.', declineCode: err.decline_code ?? null, intent: obj.id });
      return { companyId, invoiceId, outcome: 'card failure noted' };
    }
    case 'charge.refunded':
    case 'refund.created':
    case 'refund.updated':
    case 'refund.failed':
    case 'charge.refund.updated': {
      // Refunds are recorded from the refunds themselves, whoever made them (here or at Stripe)
      // and whichever event comes first; reconcileRefundTx counts each once and puts back one
      // that failed.
      if (!pre?.intent) return { companyId: null, invoiceId: null, outcome: 'ignored: not a refund of a payment' };
      const pay = await repo.findPaymentByIntent(pre.intent, trx);
      if (!pay || !pre.refunds) {
        // A refund of one of our payments that has not landed yet (events come in any order):
        // refused, so Stripe delivers it again later; the event id is not kept.
        if (pre.ours) throw new AppError('EVENT_NOT_READY', 'The payment this refund belongs to is not recorded yet; deliver the event again later.');
        return { companyId: null, invoiceId: null, outcome: 'ignored: unknown payment' };
      }
      const companyId = (await trx('payments').where('id', pay.id).first('organization_id')).organization_id as string;
      const tally = new Map<ReconcileOutcome, number>();
      for (const r of pre.refunds) {
        if (intentOf(r) !== pre.intent) continue;
        const o = await reconcileRefundTx(trx, companyId, pay.id, r);
        tally.set(o, (tally.get(o) ?? 0) + 1);
      }
      const outcome = [...tally].filter(([o]) => o !== 'unchanged').map(([o, n]) => `${n} ${o}`).join(', ');
      return { companyId, invoiceId: pay.invoiceId, outcome: outcome ? `refunds: ${outcome}` : 'refunds already recorded' };
    }
    default:
      return { companyId: null, invoiceId: null, outcome: `ignored: ${event.type}` };
  }
}
