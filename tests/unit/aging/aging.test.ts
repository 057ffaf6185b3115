import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { differenceInCalendarDays, parseISO } from 'date-fns';
import { age, agingSummary, bucketFor, daysPastDue, overdueTotal, type AgedItem } from '../../../src/lib/aging';
import { addDays } from '../../../src/lib/billing/terms';
import { parseSchedule, reminderToSend } from '../../../src/lib/reminders';

describe('aging buckets (current, 1–30, 31–60, 61–90, over 90 days past due: common practice, no source)', () => {
  it('puts the boundary days in the right bucket', () => {
    const cases: [number, string][] = [[-5, 'current'], [0, 'current'], [1, 'd1_30'], [30, 'd1_30'], [31, 'd31_60'], [60, 'd31_60'], [61, 'd61_90'], [90, 'd61_90'], [91, 'over_90'], [400, 'over_90']];
    for (const [d, b] of cases) expect(bucketFor(d), String(d)).toBe(b);
  });

  it('counts days past due as date-fns does (calendar days), across month ends and leap days', () => {
    expect(daysPastDue('2024-02-28', '2024-03-01')).toBe(2);
    expect(daysPastDue('2025-12-31', '2026-01-30')).toBe(30);
    fc.assert(fc.property(fc.integer({ min: 0, max: 3_000 }), fc.integer({ min: -200, max: 400 }), (start, n) => {
      const due = addDays('2023-01-01', start);
      const today = addDays(due, n);
      expect(daysPastDue(due, today)).toBe(differenceInCalendarDays(parseISO(today), parseISO(due)));
    }));
  });

  it('worked example: net 15 issued Mar 1, seen Apr 20 → due Mar 16, 35 days past due, 31–60 [calc]', () => {
    const a = age({ customerId: 1, customerName: 'A', issuedOn: '2026-03-01', dueOn: addDays('2026-03-01', 15), balanceCents: 1000 }, '2026-04-20');
    expect(a.dueOn).toBe('2026-03-16');
    expect(a.daysPastDue).toBe(35);
    expect(a.daysOutstanding).toBe(50);
    expect(a.bucket).toBe('d31_60');
  });

  it('adds up: buckets to the total, customers to the buckets', () => {
    fc.assert(fc.property(fc.array(fc.record({ c: fc.integer({ min: 1, max: 5 }), past: fc.integer({ min: -30, max: 200 }), bal: fc.integer({ min: 1, max: 1e8 }) }), { maxLength: 40 }), (rows) => {
      const items: AgedItem[] = rows.map((r) => age({ customerId: r.c, customerName: `C${r.c}`, issuedOn: '2026-01-01', dueOn: addDays('2026-06-01', -r.past), balanceCents: r.bal }, '2026-06-01'));
      const s = agingSummary(items);
      expect(s.totals.current + s.totals.d1_30 + s.totals.d31_60 + s.totals.d61_90 + s.totals.over_90).toBe(s.totals.total);
      expect(s.customers.reduce((a, c) => a + c.total, 0)).toBe(s.totals.total);
      expect(s.totals.total).toBe(rows.reduce((a, r) => a + r.bal, 0));
      expect(overdueTotal(items).cents).toBe(s.totals.total - s.totals.current);
    }));
  });
});

describe('reminder schedule', () => {
  const base = { offsets: [-3, 0, 7, 14], issuedOn: '2026-05-01', dueOn: '2026-05-16' };
  it('parses and refuses schedules', () => {
    expect(parseSchedule('14, -3,0,7,7')).toEqual([-3, 0, 7, 14]);
    expect(parseSchedule('x')).toBeNull();
    expect(parseSchedule('-100')).toBeNull();
  });
  it('sends the reminder whose day has come, once, and only the latest after a gap', () => {
    expect(reminderToSend({ ...base, today: '2026-05-12', sent: [] })).toBeNull();
    expect(reminderToSend({ ...base, today: '2026-05-13', sent: [] })).toBe(-3);
    expect(reminderToSend({ ...base, today: '2026-05-13', sent: [-3] })).toBeNull();
    expect(reminderToSend({ ...base, today: '2026-05-16', sent: [-3] })).toBe(0);
    // The worker was down a week: one reminder (the latest), not three.
    expect(reminderToSend({ ...base, today: '2026-06-01', sent: [] })).toBe(14);
    expect(reminderToSend({ ...base, today: '2026-06-01', sent: [14] })).toBeNull();
  });
  it('sends nothing for a day before the invoice went out', () => {
    expect(reminderToSend({ ...base, issuedOn: '2026-05-16', today: '2026-05-16', sent: [] })).toBeNull();
  });
});
