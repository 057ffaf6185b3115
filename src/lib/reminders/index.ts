import { addDays } from '../billing/terms.ts';

/** "-3,0,7,14" ↔ [-3, 0, 7, 14]: days from the due date, sorted, without repeats. */
export function parseSchedule(text: string): number[] | null {
  const parts = text.split(',').map((s) => s.trim()).filter(Boolean);
  const out: number[] = [];
  for (const p of parts) {
    if (!/^[+-]?\d{1,3}$/.test(p)) return null;
    const n = Number(p);
    if (n < -60 || n > 365) return null;
    if (!out.includes(n)) out.push(n);
  }
  return out.sort((a, b) => a - b);
}

export function formatSchedule(offsets: number[]): string {
  return offsets.join(',');
}

export function describeOffset(n: number): string {
  if (n === 0) return 'on the due date';
  const d = Math.abs(n) === 1 ? 'day' : 'days';
  return n < 0 ? `${-n} ${d} before the due date` : `${n} ${d} after the due date`;
}

/**
 * The reminder to send today, if any: the latest scheduled day that has come, falls after
 * the invoice went out and is later than any reminder already sent. A worker that was down
 * for a week sends one reminder, not a backlog, and nothing is ever sent twice.
 */
export function reminderToSend(a: { offsets: number[]; issuedOn: string; dueOn: string; today: string; sent: number[] }): number | null {
  const lastSent = a.sent.length ? Math.max(...a.sent) : -Infinity;
  let pick: number | null = null;
  for (const o of a.offsets) {
    const day = addDays(a.dueOn, o);
    if (day <= a.today && day > a.issuedOn && o > lastSent && !a.sent.includes(o)) pick = pick === null ? o : Math.max(pick, o);
  }
  return pick;
}
