import { daysBetween } from '../billing/terms.ts';
import { sum } from '../billing/money.ts';

/** The usual aging buckets by days past the due date (common practice, no source). */
export const AGING_BUCKETS = ['current', 'd1_30', 'd31_60', 'd61_90', 'over_90'] as const;
export type AgingBucket = (typeof AGING_BUCKETS)[number];
export const AGING_LABELS: Record<AgingBucket, string> = {
  current: 'Current',
  d1_30: '1–30 days',
  d31_60: '31–60 days',
  d61_90: '61–90 days',
  over_90: 'Over 90 days',
};

/** Days past due (0 or less is not yet due). An invoice with no due date is due on issue. */
export function daysPastDue(dueOn: string, today: string): number {
  return daysBetween(dueOn, today);
}

export function bucketFor(daysPast: number): AgingBucket {
  if (daysPast <= 0) return 'current';
  if (daysPast <= 30) return 'd1_30';
  if (daysPast <= 60) return 'd31_60';
  if (daysPast <= 90) return 'd61_90';
  return 'over_90';
}

export interface OpenItem {
  customerId: number;
  customerName: string;
  issuedOn: string;
  dueOn: string;
  balanceCents: number;
}

export interface AgedItem extends OpenItem {
  daysOutstanding: number;
  daysPastDue: number;
  bucket: AgingBucket;
}

export function age<T extends OpenItem>(item: T, today: string): T & AgedItem {
  const past = daysPastDue(item.dueOn, today);
  return { ...item, daysOutstanding: Math.max(0, daysBetween(item.issuedOn, today)), daysPastDue: past, bucket: bucketFor(past) };
}

export type BucketTotals = Record<AgingBucket, number> & { total: number };

function emptyTotals(): BucketTotals {
  return { current: 0, d1_30: 0, d31_60: 0, d61_90: 0, over_90: 0, total: 0 };
}

/** Totals per bucket and per customer; every row and column adds up to the grand total. */
export function agingSummary(items: AgedItem[]): { totals: BucketTotals; customers: ({ customerId: number; customerName: string } & BucketTotals)[] } {
  const totals = emptyTotals();
  const byCustomer = new Map<number, { customerId: number; customerName: string } & BucketTotals>();
  for (const it of items) {
    const c = byCustomer.get(it.customerId) ?? { customerId: it.customerId, customerName: it.customerName, ...emptyTotals() };
    c[it.bucket] = sum([c[it.bucket], it.balanceCents]);
    c.total = sum([c.total, it.balanceCents]);
    totals[it.bucket] = sum([totals[it.bucket], it.balanceCents]);
    totals.total = sum([totals.total, it.balanceCents]);
    byCustomer.set(it.customerId, c);
  }
  const customers = [...byCustomer.values()].sort((a, b) => b.total - a.total || a.customerName.localeCompare(b.customerName));
  return { totals, customers };
}

/** Overdue: past the due date with a balance. */
export function overdueTotal(items: AgedItem[]): { count: number; cents: number } {
  const over = items.filter((i) => i.bucket !== 'current' && i.balanceCents > 0);
  return { count: over.length, cents: sum(over.map((i) => i.balanceCents)) };
}
