/**
 * A card refund's life at the card processor, as Tallypost keeps it (stripe_refunds.status):
 * `requested` is ours (the row written before the processor is asked), `refused` is ours
 * (the processor said no; nothing was refunded), the rest are Stripe's Refund.status values
 * (stripe-node types, Refund.status: pending, requires_action, succeeded, failed, canceled).
 */
export const PROCESSOR_REFUND_STATES = ['requested', 'refused', 'requires_action', 'pending', 'succeeded', 'failed', 'canceled'] as const;
export type ProcessorRefundState = (typeof PROCESSOR_REFUND_STATES)[number];

/**
 * How far along each state is. A refund moves pending or requires_action → succeeded, and
 * from any of those to failed or canceled, never back (Stripe's refund docs: a refund can
 * fail after it first shows as succeeded). Events arrive in any order, so the state kept is
 * the furthest one seen: the same whatever order the events came in.
 */
const RANK: Record<ProcessorRefundState, number> = { requested: 0, refused: 5, requires_action: 1, pending: 2, succeeded: 3, failed: 4, canceled: 4 };

/** Stripe's status as one of ours; an unknown or missing one is treated as still pending. */
export function processorState(status: string | null | undefined): ProcessorRefundState {
  return status === 'requires_action' || status === 'pending' || status === 'succeeded' || status === 'failed' || status === 'canceled' ? status : 'pending';
}

/** The furthest of two states (ties, failed against canceled, go to the first in name order, so the answer never depends on arrival order). */
export function laterRefundState(a: ProcessorRefundState, b: ProcessorRefundState): ProcessorRefundState {
  if (RANK[a] !== RANK[b]) return RANK[a] > RANK[b] ? a : b;
  return a < b ? a : b;
}

/** Whether money is on its way back to the customer: counted off the payment and the invoice. */
export function countsAsRefunded(state: ProcessorRefundState): boolean {
  return state === 'requires_action' || state === 'pending' || state === 'succeeded';
}

/** Whether the refund is over and nothing was returned. */
export function refundUndone(state: ProcessorRefundState): boolean {
  return state === 'failed' || state === 'canceled' || state === 'refused';
}

/**
 * A counted refund that failed at the processor is put back: the payment's refunded amount
 * goes down by it, and the invoice gets back the part of it that came off the invoice.
 * Refunds come off a payment's credit first (refundSplit), so of everything refunded,
 * max(0, refunded − credit) came off the invoice; putting back `amountCents` restores the
 * difference that makes. Null when more is put back than was refunded.
 */
export function refundReversal(p: { creditCents: number; refundedCents: number }, amountCents: number): { toInvoiceCents: number; refundedCents: number } | null {
  if (!Number.isSafeInteger(amountCents) || amountCents <= 0 || amountCents > p.refundedCents) return null;
  const offInvoice = (refunded: number) => Math.max(0, refunded - p.creditCents);
  const refundedCents = p.refundedCents - amountCents;
  return { toInvoiceCents: offInvoice(p.refundedCents) - offInvoice(refundedCents), refundedCents };
}
