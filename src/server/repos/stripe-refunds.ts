import type { Knex } from 'knex';
import { toInt } from '../db.ts';
import type { ProcessorRefundState } from '../../lib/billing/refunds.ts';

/** One refund of a card payment at the card processor (migration 20261203100000). */
export interface StripeRefundRow {
  id: number;
  paymentId: number;
  invoiceId: number;
  amountCents: number;
  reason: string | null;
  requestedBy: string | null;
  requestKey: string;
  stripeRefund: string | null;
  status: ProcessorRefundState;
  failure: string | null;
  createdAt: Date;
}

function fromRow(r: Record<string, unknown>): StripeRefundRow {
  return {
    id: Number(r.id), paymentId: Number(r.payment_id), invoiceId: Number(r.invoice_id), amountCents: toInt(r.amount_cents), reason: (r.reason as string) ?? null,
    requestedBy: (r.requested_by as string) ?? null, requestKey: String(r.request_key), stripeRefund: (r.stripe_refund as string) ?? null,
    status: r.status as ProcessorRefundState, failure: (r.failure as string) ?? null, createdAt: new Date(r.created_at as string),
  };
}

/** Rows are read with a lock: every caller holds the invoice and payment locks first, so this never waits long. */
export async function findByStripeId(stripeRefund: string, trx: Knex.Transaction): Promise<StripeRefundRow | undefined> {
  const r = await trx('stripe_refunds').where({ stripe_refund: stripeRefund }).forUpdate().first();
  return r ? fromRow(r) : undefined;
}

export async function findById(companyId: string, id: number, trx: Knex.Transaction): Promise<StripeRefundRow | undefined> {
  const r = await trx('stripe_refunds').where({ organization_id: companyId, id }).forUpdate().first();
  return r ? fromRow(r) : undefined;
}

export async function findByRequestKey(companyId: string, paymentId: number, requestKey: string, trx: Knex.Transaction): Promise<StripeRefundRow | undefined> {
  const r = await trx('stripe_refunds').where({ organization_id: companyId, payment_id: paymentId, request_key: requestKey }).forUpdate().first();
  return r ? fromRow(r) : undefined;
}

/**
 * A request of the same amount on the same payment still waiting for the processor's answer,
 * younger than Stripe keeps idempotency keys (24 hours): asking again is the same refund.
 */
export async function findUnansweredRequest(companyId: string, paymentId: number, amountCents: number, trx: Knex.Transaction): Promise<StripeRefundRow | undefined> {
  const r = await trx('stripe_refunds')
    .where({ organization_id: companyId, payment_id: paymentId, amount_cents: amountCents, status: 'requested' })
    .whereNull('stripe_refund')
    .whereRaw('created_at > NOW(3) - INTERVAL 23 HOUR')
    .orderBy('id')
    .forUpdate()
    .first();
  return r ? fromRow(r) : undefined;
}

export async function insertStripeRefund(
  companyId: string,
  r: { paymentId: number; invoiceId: number; amountCents: number; reason: string | null; requestedBy: string | null; requestKey: string; stripeRefund: string | null; status: ProcessorRefundState },
  trx: Knex.Transaction,
): Promise<StripeRefundRow> {
  const [id] = await trx('stripe_refunds').insert({
    organization_id: companyId, payment_id: r.paymentId, invoice_id: r.invoiceId, amount_cents: r.amountCents, reason: r.reason, requested_by: r.requestedBy,
    request_key: r.requestKey, stripe_refund: r.stripeRefund, status: r.status,
  });
  return (await findById(companyId, Number(id), trx))!;
}

export async function updateStripeRefund(companyId: string, id: number, patch: { stripeRefund?: string; status?: ProcessorRefundState; failure?: string | null; amountCents?: number }, trx: Knex.Transaction): Promise<void> {
  await trx('stripe_refunds').where({ organization_id: companyId, id }).update({
    ...(patch.stripeRefund !== undefined ? { stripe_refund: patch.stripeRefund } : {}),
    ...(patch.status !== undefined ? { status: patch.status } : {}),
    ...(patch.failure !== undefined ? { failure: patch.failure?.slice(0, 500) ?? null } : {}),
    ...(patch.amountCents !== undefined ? { amount_cents: patch.amountCents } : {}),
    updated_at: trx.fn.now(3),
  });
}

/** The counted refund (refunds row) a Stripe refund made, locked. */
export async function ledgerRefund(companyId: string, stripeRefund: string, trx: Knex.Transaction): Promise<{ id: number; amountCents: number; reason: string | null } | undefined> {
  const r = await trx('refunds').where({ organization_id: companyId, stripe_refund: stripeRefund }).forUpdate().first('id', 'amount_cents', 'reason');
  return r ? { id: Number(r.id), amountCents: toInt(r.amount_cents), reason: r.reason ?? null } : undefined;
}

/** A failed refund stays listed, at zero, with what happened. */
export async function zeroLedgerRefund(companyId: string, id: number, reason: string, trx: Knex.Transaction): Promise<void> {
  await trx('refunds').where({ organization_id: companyId, id }).update({ amount_cents: 0, reason: reason.slice(0, 500) });
}
