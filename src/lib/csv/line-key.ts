import type { ReceiptLineValues, TimesheetLineValues } from './normalise.ts';

const norm = (v: string | null | undefined) => (v ?? '').trim().toLowerCase().replace(/\s+/g, ' ');

/**
 * What makes a receipt line the same line when it arrives again, in this file or another:
 * supplier + receipt number + line number when the file has all three, else the line's
 * content. The server hashes this text; `occurrence` tells apart identical lines of one file.
 */
export function receiptLineKey(v: ReceiptLineValues, supplier: string | null, occurrence: number): string {
  const s = norm(supplier ?? v.supplierName);
  if (s && v.receiptNumber && v.lineNumber) return ['r', s, norm(v.receiptNumber), norm(v.lineNumber)].join('|');
  return ['c', s, v.date, norm(v.receiptNumber), norm(v.sku), norm(v.description), v.quantity ?? '', v.amountCents, v.taxCents, occurrence].join('|');
}

export function timesheetLineKey(v: TimesheetLineValues, occurrence: number): string {
  return ['t', norm(v.workerName), norm(v.jobRef), v.date, v.task, v.hours, occurrence].join('|');
}

/** Counts how often each content key has been seen, for the occurrence number. */
export class OccurrenceCounter {
  private seen = new Map<string, number>();
  next(content: string): number {
    const n = (this.seen.get(content) ?? 0) + 1;
    this.seen.set(content, n);
    return n;
  }
}
