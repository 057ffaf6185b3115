import { createHash } from 'node:crypto';
import type Stripe from 'stripe';
import { db } from '../db.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { toStripeAmount } from '../../lib/billing/stripe-amount.ts';
import { env } from '../env.ts';
import { findByPublicNonce } from '../repos/invoices.ts';
import { billingSettings } from '../repos/billing-settings.ts';
import { invoiceDetail } from './invoices.ts';
import { invoicePdf } from './invoice-pdf.ts';
import { invoiceToken, readToken } from './invoice-links.ts';
import { stripe } from '../payments/stripe.ts';
import { recordCheckoutSession } from './checkout-sessions.ts';

async function byToken(token: string | undefined) {
  const t = readToken(token);
  const inv = t ? await findByPublicNonce(t.id, t.nonce) : undefined;
  if (!inv) throw notFound('That invoice');
  return inv;
}

/** What the customer's page shows: the invoice without anything internal (no audit trail, no warnings). */
export async function publicInvoice(token: string | undefined) {
  const inv = await byToken(token);
  const d = await invoiceDetail(inv.companyId, inv.id);
  const s = await billingSettings(inv.companyId);
  return {
    token: invoiceToken(inv.id, inv.publicNonce),
    company: { name: s.companyName, address: s.address, phone: s.phone, email: s.email },
    currency: s.currency,
    numberText: d.numberText!,
    kindLabel: d.kindLabel,
    status: d.status,
    displayStatus: d.displayStatus,
    issuedOn: d.issuedOn,
    dueOn: d.dueOn,
    customerName: d.customer.name,
    job: { title: d.job.title, site: d.job.site },
    lines: d.lines.map((l) => ({ description: l.description, quantity: l.quantity, unitPriceCents: l.unitPriceCents, amountCents: l.amountCents, taxable: l.taxable })),
    subtotalCents: d.subtotalCents, taxMode: d.taxMode, taxRatePct: d.taxRatePct, taxCents: d.taxCents, retainagePct: d.retainagePct, retainageHeldCents: d.retainageHeldCents,
    totalCents: d.totalCents, paidCents: d.paidCents, balanceCents: d.balanceCents,
    payments: d.payments.map((p) => ({ receivedOn: p.receivedOn, method: p.method, amountCents: p.amountCents - p.refundedCents })),
  };
}

export async function publicInvoicePdf(token: string | undefined) {
  const inv = await byToken(token);
  return invoicePdf(inv.companyId, inv.id);
}

const digest = (text: string) => createHash('sha256').update(text).digest('hex');

/**
 * The idempotency key of a Checkout Session: the invoice, the customer link's nonce (as a
 * hash, so the secret half of the link is not copied into request logs) and a hash of every
 * parameter sent (amount, currency, e-mail, names, return addresses) with the invoice's count
 * of payments and refunds. Pressing Pay twice sends the same request and gets the same session;
 * a revoked link, a changed balance, e-mail or company name, or a balance that came back after
 * a refund is another request, so it gets another key. Stripe refuses a key used again with
 * different parameters (idempotency_error) for 24 hours.
 */
export function checkoutIdempotencyKey(invoiceId: number, nonce: string, params: unknown, history: { payments: number; refunds: number }): string {
  return `checkout:${invoiceId}:${digest(`nonce:${nonce}`).slice(0, 16)}:${digest(JSON.stringify({ params, history })).slice(0, 40)}`;
}

/** A Stripe Checkout Session for the balance due; the session is remembered so it can be expired later. */
export async function startCheckout(token: string | undefined): Promise<{ url: string }> {
  const inv = await byToken(token);
  if (inv.status !== 'issued' && inv.status !== 'partly_paid') throw new AppError('RULE_BROKEN', inv.status === 'paid' ? 'This invoice is paid in full. Thank you!' : 'This invoice is not open for payment.');
  const balance = inv.totalCents - inv.paidCents;
  if (balance <= 0) throw new AppError('RULE_BROKEN', 'Nothing is owed on this invoice.');
  const s = await billingSettings(inv.companyId);
  const cust = await db()('customers').where({ organization_id: inv.companyId, id: inv.customerId }).first('email');
  const job = await db()('jobs').where({ organization_id: inv.companyId, id: inv.jobId }).first('title', 'code');
  const [payments, refunds] = await Promise.all(
    ['payments', 'refunds'].map(async (table) => Number((await db()(table).where({ organization_id: inv.companyId, invoice_id: inv.id }).count({ n: '*' }).first())?.n ?? 0)),
  );
  const t = invoiceToken(inv.id, inv.publicNonce);
  const meta = { invoice_id: String(inv.id), organization_id: inv.companyId };
  const params: Stripe.Checkout.SessionCreateParams = {
    mode: 'payment',
    client_reference_id: String(inv.id),
    customer_email: cust?.email ?? undefined,
    line_items: [{ quantity: 1, price_data: { currency: s.currency.toLowerCase(), unit_amount: toStripeAmount(balance, s.currency), product_data: { name: `${s.companyName} — invoice ${inv.numberText}`, description: `${job?.code ?? ''} ${job?.title ?? ''}`.trim() } } }],
    metadata: meta,
    payment_intent_data: { metadata: meta, description: `Invoice ${inv.numberText}` },
    success_url: `${env().APP_URL}/pay/${t}?paid={CHECKOUT_SESSION_ID}`,
    cancel_url: `${env().APP_URL}/pay/${t}?cancelled=1`,
  };
  let session: Stripe.Checkout.Session;
  try {
    session = await stripe().checkout.sessions.create(params, { idempotencyKey: checkoutIdempotencyKey(inv.id, inv.publicNonce, params, { payments, refunds }) });
  } catch (err) {
    throw new AppError('PAYMENT_PROVIDER', `Online payment is not available right now (${err instanceof Error ? err.message : String(err)}). Please try again in a minute.`);
  }
  if (!session.url || session.status !== 'open') throw new AppError('PAYMENT_PROVIDER', 'Online payment is not available right now (the payment page did not open). Please try again in a minute.');
  await recordCheckoutSession(inv.companyId, inv.id, session.id, balance);
  return { url: session.url };
}
