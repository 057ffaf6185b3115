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

/**
 * A Stripe Checkout Session for the balance due. The idempotency key names the invoice and
 * what has been paid, so pressing Pay twice gives the same session, and a new balance a new one.
 */
export async function startCheckout(token: string | undefined): Promise<{ url: string }> {
  const inv = await byToken(token);
  if (inv.status !== 'issued' && inv.status !== 'partly_paid') throw new AppError('RULE_BROKEN', inv.status === 'paid' ? 'This invoice is paid in full. Thank you!' : 'This invoice is not open for payment.');
  const balance = inv.totalCents - inv.paidCents;
  if (balance <= 0) throw new AppError('RULE_BROKEN', 'Nothing is owed on this invoice.');
  const s = await billingSettings(inv.companyId);
  const cust = await db()('customers').where({ organization_id: inv.companyId, id: inv.customerId }).first('email');
  const job = await db()('jobs').where({ organization_id: inv.companyId, id: inv.jobId }).first('title', 'code');
  const t = invoiceToken(inv.id, inv.publicNonce);
  const meta = { invoice_id: String(inv.id), organization_id: inv.companyId };
  try {
    const session = await stripe().checkout.sessions.create(
      {
        mode: 'payment',
        client_reference_id: String(inv.id),
        customer_email: cust?.email ?? undefined,
        line_items: [{ quantity: 1, price_data: { currency: s.currency.toLowerCase(), unit_amount: toStripeAmount(balance, s.currency), product_data: { name: `${s.companyName} — invoice ${inv.numberText}`, description: `${job?.code ?? ''} ${job?.title ?? ''}`.trim() } } }],
        metadata: meta,
        payment_intent_data: { metadata: meta, description: `Invoice ${inv.numberText}` },
        success_url: `${env().APP_URL}/pay/${t}?paid={CHECKOUT_SESSION_ID}`,
        cancel_url: `${env().APP_URL}/pay/${t}?cancelled=1`,
      },
      { idempotencyKey: `checkout:${inv.id}:${inv.paidCents}:${balance}` },
    );
    if (!session.url) throw new Error('no hosted page address came back');
    return { url: session.url };
  } catch (err) {
    throw new AppError('PAYMENT_PROVIDER', `Online payment is not available right now (${err instanceof Error ? err.message : String(err)}). Please try again in a minute.`);
  }
}
