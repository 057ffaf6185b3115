import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { addBusinessDays as dfAddBusinessDays, format } from 'date-fns';
import { addBusinessDays, daysBetween, isBusinessDay, MON_TO_FRI } from '../../../src/lib/checklist/business-days';
import { buildingGate, checklistInput, gateAdvice, locateDates, locateStatus, permitNeeded, type LocateRules } from '../../../src/lib/checklist/checklist';

const rules: LocateRules = { waitBusinessDays: 2, validDays: 14, validBasis: 'calendar', calendar: MON_TO_FRI };

describe('business days', () => {
  it('Fri 2025-01-03 + 1 business day = Mon 2025-01-06 (date-fns documentation example)', () => {
    expect(addBusinessDays('2025-01-03', 1, MON_TO_FRI)).toBe('2025-01-06');
  });

  it('agrees with date-fns addBusinessDays on Monday-to-Friday weeks', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: 3650 }), fc.integer({ min: 0, max: 40 }), (offset, n) => {
      const start = new Date(Date.UTC(2024, 0, 1) + offset * 86_400_000);
      const iso = start.toISOString().slice(0, 10);
      const local = new Date(start.getUTCFullYear(), start.getUTCMonth(), start.getUTCDate());
      // date-fns counts a weekend start differently for n = 0; compare from business days only.
      if (!isBusinessDay(iso, MON_TO_FRI) && n === 0) return;
      expect(addBusinessDays(iso, n, MON_TO_FRI)).toBe(format(dfAddBusinessDays(local, n), 'yyyy-MM-dd'));
    }), { numRuns: 300 });
  });

  it('skips the company holidays', () => {
    const cal = { workdays: [1, 2, 3, 4, 5], holidays: ['2026-12-25'] };
    expect(addBusinessDays('2026-12-24', 1, cal)).toBe('2026-12-28');
    expect(daysBetween('2026-12-24', '2026-12-28')).toBe(4);
  });
});

describe('the locate ticket', () => {
  it('counts the wait in business days and the life in the chosen basis', () => {
    expect(locateDates('2026-12-04', rules)).toEqual({ digFrom: '2026-12-08', expiresOn: '2026-12-18' });
    expect(locateDates('2026-12-04', { ...rules, validBasis: 'business', validDays: 10 })).toEqual({ digFrom: '2026-12-08', expiresOn: '2026-12-18' });
  });

  it('is missing, waiting, ready or expired', () => {
    expect(locateStatus(null, null, '2026-12-05', rules).status).toBe('missing');
    expect(locateStatus('T-1', '2026-12-04', '2026-12-07', rules).status).toBe('waiting');
    expect(locateStatus('T-1', '2026-12-04', '2026-12-08', rules).status).toBe('ready');
    expect(locateStatus('T-1', '2026-12-04', '2026-12-19', rules).status).toBe('expired');
  });

  it('holds the building stage until a current ticket or an owner override is on file', () => {
    expect(buildingGate('missing', null).ok).toBe(false);
    expect(buildingGate('expired', null).message).toMatch(/expired/);
    expect(buildingGate('ready', null).ok).toBe(true);
    expect(buildingGate('missing', 'Customer dug the holes under their own ticket last week.').ok).toBe(true);
  });

  it('asks for the call date with a ticket number, and the other way round', () => {
    const r = checklistInput.safeParse({ locateTicketNumber: 'A-1' });
    expect(r.success).toBe(false);
    expect(checklistInput.safeParse({ locateTicketNumber: 'A-1', locateCalledOn: '2026-02-30' }).success).toBe(false);
    expect(checklistInput.safeParse({ locateTicketNumber: 'A-1', locateCalledOn: '2026-02-27' }).success).toBe(true);
  });
});

describe('permits by yard position', () => {
  const limits = { front: 48, side: 72, back: 72 };
  it('needs a permit when a run is over its yard limit (front yards often lower)', () => {
    expect(permitNeeded([{ heightIn: 72, yard: 'back' }], limits)).toEqual({ needed: false, reasons: [] });
    expect(permitNeeded([{ heightIn: 60, yard: 'front' }], limits).needed).toBe(true);
    expect(permitNeeded([{ heightIn: 60, yard: 'front' }], { ...limits, front: null }).needed).toBe(null);
  });
});

describe('what the checklist says at each stage of the job', () => {
  it('is the gate before building, a warning for digging left while building, and a record afterwards', () => {
    expect(gateAdvice('expired', null, 'won')).toEqual({ ok: false, message: expect.stringMatching(/before the job moves to building/) });
    expect(gateAdvice('ready', null, 'won')).toEqual({ ok: true, message: 'The job may move to building.' });
    expect(gateAdvice('expired', null, 'building')).toEqual({ ok: false, message: expect.stringMatching(/^The locate ticket has expired while the job is being built\. If any digging is left/) });
    expect(gateAdvice('missing', null, 'building').message).toMatch(/before anyone digs/);
    expect(gateAdvice('expired', 'Post repair only, no new holes', 'building')).toEqual({ ok: true, message: 'Owner override on file: Post repair only, no new holes' });
    for (const s of ['completed', 'closed', 'lost']) expect(gateAdvice('expired', null, s)).toEqual({ ok: true, message: 'The job is past digging; the checklist stays as its record.' });
  });
});
