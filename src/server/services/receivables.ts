import type { Actor } from '../http.ts';
import { age, agingSummary, overdueTotal, AGING_BUCKETS, AGING_LABELS, type AgingBucket } from '../../lib/aging/index.ts';
import { neutraliseCsvCell } from '../../lib/text.ts';
import { centsToInput } from '../../lib/billing/money.ts';
import { openInvoices } from '../repos/invoices.ts';
import { billingSettings, todayIn } from '../repos/billing-settings.ts';

export async function receivables(actor: Actor, filter: { bucket?: AgingBucket[]; customer?: number } = {}) {
  const s = await billingSettings(actor.companyId);
  const today = todayIn(s.timezone);
  const open = await openInvoices(actor.companyId);
  const aged = open.map((i) =>
    age({ id: i.id, numberText: i.numberText ?? '', jobId: i.jobId, jobCode: i.jobCode, jobTitle: i.jobTitle, customerId: i.customerId, customerName: i.customerName, kind: i.kind, status: i.status, issuedOn: i.issuedOn ?? today, dueOn: i.dueOn ?? i.issuedOn ?? today, totalCents: i.totalCents, paidCents: i.paidCents, balanceCents: i.balanceCents }, today),
  );
  const items = aged.filter((i) => (!filter.bucket?.length || filter.bucket.includes(i.bucket)) && (!filter.customer || i.customerId === filter.customer));
  const summary = agingSummary(items);
  return { today, currency: s.currency, items, ...summary, overdue: overdueTotal(items) };
}

/**
 * The same rows as CSV, then the totals per aging bucket and per customer and the grand total
 * (amounts in dollars with two decimals; cells that could run as formulas are neutralised).
 */
export async function receivablesCsv(actor: Actor, filter: { bucket?: AgingBucket[]; customer?: number }) {
  const r = await receivables(actor, filter);
  const head = ['Invoice', 'Customer', 'Job', 'Issued', 'Due', 'Days outstanding', 'Days past due', 'Aging', 'Total', 'Paid', 'Balance'];
  const esc = (v: string) => {
    const t = neutraliseCsvCell(v);
    return /[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
  };
  const lines = [head.join(',')];
  for (const i of r.items) {
    lines.push([i.numberText, i.customerName, `${i.jobCode} ${i.jobTitle}`, i.issuedOn, i.dueOn, String(i.daysOutstanding), String(Math.max(0, i.daysPastDue)), AGING_LABELS[i.bucket], centsToInput(i.totalCents), centsToInput(i.paidCents), centsToInput(i.balanceCents)].map(esc).join(','));
  }
  // The screen's totals follow the rows: one per aging bucket, one per customer, then the whole.
  for (const b of AGING_BUCKETS) lines.push(['Total', '', '', '', '', '', '', AGING_LABELS[b], '', '', centsToInput(r.totals[b])].map(esc).join(','));
  for (const c of r.customers) lines.push(['Customer total', c.customerName, '', '', '', '', '', '', '', '', centsToInput(c.total)].map(esc).join(','));
  lines.push(['Total', '', '', '', '', '', '', 'All', '', '', centsToInput(r.totals.total)].map(esc).join(','));
  return { csv: `${lines.join('\r\n')}\r\n`, filename: `receivables-${r.today}.csv` };
}
