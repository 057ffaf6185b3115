import type Stripe from 'stripe';
import { z } from 'zod';
import type { Actor } from '../http.ts';
import { AppError } from '../../lib/errors.ts';
import { fromStripeAmount } from '../../lib/billing/stripe-amount.ts';
import { refundSplit } from '../../lib/billing/payments.ts';
import * as repo from '../repos/invoices.ts';
import { billingSettings, todayIn } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { verifyWebhook } from '../payments/stripe.ts';
import { insertRefundTx, landPaymentTx } from './payments.ts';
import { tx } from './invoices.ts';
import { bumpDataVersion } from '../report-cache.ts';
import { expireStaleCheckoutSessions, markCheckoutSession } from './checkout-sessions.ts';

/** What Tallypost put in the metadata when it made the checkout session; refused unless it reads back exactly. */
const metadata = z.object({ invoice_id: z.string().regex(/^\d{1,15}$/), organization_id: z.string().min(1).max(36) });

const system = (companyId: string): Actor => ({ companyId, userId: '', role: 'owner' });

type Outcome = { status: number; body: { received: true; outcome: string } };

/**
 * The webhook: verify the raw body, store the event id, act on it once. The event row and
 * its effect commit together, so a replay (or a second delivery racing the first) finds the
 * id and changes nothing, and a payment is recorded once whichever of its events comes first.
 */
export async function handleStripeWebhook(raw: Buffer, signature: string | null): Promise<Outcome> {
  const v = verifyWebhook(raw, signature);
  if (!v.ok) throw new AppError('BAD_SIGNATURE', `Webhook refused: ${v.reason}`);
  const event = v.event;
  // The event row is inserted first: a second delivery of the same id waits on it and then
  // finds it taken; nothing else is locked before the invoice row.
  const outcome = await tx(async (trx) => {
    try {
      await trx('stripe_events').insert({ id: event.id, type: event.type, outcome: 'processing' });
    } catch (err) {
      if ((err as { code?: string }).code === 'ER_DUP_ENTRY') return 'already handled';
      throw err;
    }
    const result = await apply(trx, event);
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

async function apply(trx: import('knex').Knex.Transaction, event: Stripe.Event): Promise<Applied> {
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
    case 'charge.refunded': {
      // Refunds made in Tallypost are recorded when made; this catches one whose record was lost, or made elsewhere.
      const intent = String(obj.payment_intent ?? '');
      const pay = intent ? await repo.findPaymentByIntent(intent, trx) : undefined;
      if (!pay) {
        // A refund of one of our payments that has not landed yet (events can arrive in any
        // order): refuse it so Stripe delivers it again later; the event id is not kept.
        if (meta.success) throw new AppError('EVENT_NOT_READY', 'The payment this refund belongs to is not recorded yet; deliver the event again later.');
        return { companyId: null, invoiceId: null, outcome: 'ignored: unknown payment' };
      }
      const companyId = (await trx('payments').where('id', pay.id).first('organization_id')).organization_id as string;
      const s = await billingSettings(companyId, trx);
      const refunds = ((obj.refunds as { data?: { id: string; amount: number }[] } | undefined)?.data ?? []);
      let n = 0;
      for (const rf of refunds) {
        // Locks first, then a locking read: a refund made in Tallypost a moment ago is seen.
        const inv = (await repo.findInvoice(companyId, pay.invoiceId, trx, true))!;
        const fresh = (await repo.findPayment(companyId, pay.id, trx, true))!;
        if (await trx('refunds').where('stripe_refund', rf.id).forUpdate().first('id')) continue;
        const cents = fromStripeAmount(rf.amount, s.currency);
        const part = refundSplit(fresh, cents);
        if (!part) continue;
        await insertRefundTx(trx, system(companyId), inv, fresh, part, { amountCents: cents, reason: 'Refunded at the card processor', stripeRefund: rf.id });
        n++;
      }
      return { companyId, invoiceId: pay.invoiceId, outcome: n ? `${n} refund(s) recorded` : 'refunds already recorded' };
    }
    default:
      return { companyId: null, invoiceId: null, outcome: `ignored: ${event.type}` };
  }
}
