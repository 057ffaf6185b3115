export const PAYMENT_METHODS = ['card', 'check', 'cash', 'bank_transfer'] as const;
export type PaymentMethod = (typeof PAYMENT_METHODS)[number];
export const MANUAL_METHODS = ['check', 'cash', 'bank_transfer'] as const;
export const PAYMENT_METHOD_LABELS: Record<PaymentMethod, string> = { card: 'Card (online)', check: 'Check', cash: 'Cash', bank_transfer: 'Bank transfer' };

export type Application = { ok: true; appliedCents: number; creditCents: number } | { ok: false; reason: 'NOT_OPEN' | 'NOT_POSITIVE' | 'OVERPAYMENT'; balanceCents: number };

/**
 * How a payment lands on an invoice: all of it when it fits the balance; the excess as
 * credit on the customer's account only when asked; otherwise refused.
 */
export function applyPayment(a: { totalCents: number; paidCents: number; amountCents: number; asCredit: boolean; open: boolean }): Application {
  const balanceCents = a.totalCents - a.paidCents;
  if (!a.open) return { ok: false, reason: 'NOT_OPEN', balanceCents };
  if (!Number.isSafeInteger(a.amountCents) || a.amountCents <= 0) return { ok: false, reason: 'NOT_POSITIVE', balanceCents };
  if (a.amountCents <= balanceCents) return { ok: true, appliedCents: a.amountCents, creditCents: 0 };
  if (!a.asCredit) return { ok: false, reason: 'OVERPAYMENT', balanceCents };
  const applied = Math.max(0, balanceCents);
  return { ok: true, appliedCents: applied, creditCents: a.amountCents - applied };
}

/**
 * A refund comes off the credit first, then off what the invoice was paid: returns how
 * much of each, or null when it is more than is left of the payment.
 */
export function refundSplit(p: { appliedCents: number; creditCents: number; refundedCents: number }, amountCents: number): { fromCreditCents: number; fromInvoiceCents: number } | null {
  const left = p.appliedCents + p.creditCents - p.refundedCents;
  if (!Number.isSafeInteger(amountCents) || amountCents <= 0 || amountCents > left) return null;
  const creditLeft = Math.max(0, p.creditCents - p.refundedCents);
  const fromCreditCents = Math.min(creditLeft, amountCents);
  return { fromCreditCents, fromInvoiceCents: amountCents - fromCreditCents };
}
