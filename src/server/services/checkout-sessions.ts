import type { Knex } from 'knex';
import { db } from '../db.ts';
import { stripe } from '../payments/stripe.ts';

type Q = Knex | Knex.Transaction;

/** Remembers a Checkout Session made for an invoice (a replayed one is already there). */
export async function recordCheckoutSession(companyId: string, invoiceId: number, sessionId: string, amountCents: number, q: Q = db()): Promise<void> {
  await q('checkout_sessions').insert({ organization_id: companyId, invoice_id: invoiceId, stripe_session: sessionId, amount_cents: amountCents }).onConflict('stripe_session').ignore();
}

/** The session the customer paid through is no longer one to expire. */
export async function markCheckoutSession(companyId: string, sessionId: string, status: 'complete' | 'expired', q: Q = db()): Promise<void> {
  await q('checkout_sessions').where({ organization_id: companyId, stripe_session: sessionId }).update({ status, updated_at: q.fn.now(3) });
}

/**
 * Expires the open Checkout Sessions that no longer match what is owed: the invoice was paid
 * another way, voided, or its balance changed. Otherwise the customer could still pay an old
 * hosted page and the money would land as credit. A session the processor no longer has open
 * (paid a moment ago, expired on its own) is recorded as it is; one that could not be reached
 * stays open here and is tried again by the worker. Never throws: the change that called it
 * is already committed.
 */
export async function expireStaleCheckoutSessions(scope: { companyId: string; invoiceId: number } | { limit: number }): Promise<number> {
  let rows: { organization_id: string; stripe_session: string }[];
  try {
    const b = db()('checkout_sessions as cs')
      .join('invoices as i', function () { this.on('i.id', 'cs.invoice_id').andOn('i.organization_id', 'cs.organization_id'); })
      .where('cs.status', 'open')
      .andWhere((w) => w.whereNotIn('i.status', ['issued', 'partly_paid']).orWhereRaw('cs.amount_cents <> i.total_cents - i.paid_cents'))
      .select('cs.organization_id', 'cs.stripe_session')
      .orderBy('cs.id');
    if ('companyId' in scope) b.andWhere({ 'cs.organization_id': scope.companyId, 'cs.invoice_id': scope.invoiceId });
    else b.limit(scope.limit);
    rows = await b;
  } catch (err) {
    console.error('[checkout] could not list sessions to expire', err);
    return 0;
  }
  let expired = 0;
  for (const r of rows) {
    try {
      const s = await stripe().checkout.sessions.expire(r.stripe_session);
      await markCheckoutSession(r.organization_id, r.stripe_session, s.status === 'complete' ? 'complete' : 'expired');
      expired++;
    } catch (err) {
      try {
        const s = await stripe().checkout.sessions.retrieve(r.stripe_session);
        if (s.status === 'complete' || s.status === 'expired') await markCheckoutSession(r.organization_id, r.stripe_session, s.status === 'complete' ? 'complete' : 'expired');
        else console.error(`[checkout] could not expire ${r.stripe_session}:`, err instanceof Error ? err.message : err);
      } catch (again) {
        console.error(`[checkout] could not reach the processor for ${r.stripe_session}:`, again instanceof Error ? again.message : again);
      }
    }
  }
  return expired;
}
