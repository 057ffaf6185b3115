import { invoiceStateLabel, type InvoiceStatus } from '../../../lib/billing/invoice';

/** The state in words; the colour repeats it. */
const TONE: Record<InvoiceStatus | 'overdue', string> = {
  draft: 'bg-galv-100 text-galv-800',
  issued: 'bg-timber-100 text-timber-800',
  partly_paid: 'bg-timber-200 text-timber-900',
  paid: 'bg-moss-100 text-moss-700',
  void: 'bg-galv-700 text-white',
  overdue: 'bg-rust-100 text-rust-700',
};

/** `sent`: the invoice was e-mailed at least once (its sent_at is set). */
export function InvoiceStatusPill({ status, sent }: { status: InvoiceStatus | 'overdue'; sent: boolean }) {
  return <span className={`pill whitespace-nowrap ${TONE[status]}`} data-testid="invoice-status">{invoiceStateLabel(status, sent)}</span>;
}
