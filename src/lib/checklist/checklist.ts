import { z } from 'zod';
import { addBusinessDays, addCalendarDays, isIsoDate, type BusinessCalendar } from './business-days.ts';
import { YARD_LABELS, type YardPosition } from '../takeoff/input.ts';

/** How the company's one-call centre counts: the wait before digging and the ticket's life. */
export interface LocateRules {
  /** business days after the call before digging may start */
  waitBusinessDays: number;
  /** the ticket's life, counted from the day it was called in */
  validDays: number;
  validBasis: 'business' | 'calendar';
  calendar: BusinessCalendar;
}

export function locateDates(calledOn: string, rules: LocateRules): { digFrom: string; expiresOn: string } {
  return {
    digFrom: addBusinessDays(calledOn, rules.waitBusinessDays, rules.calendar),
    expiresOn: rules.validBasis === 'business' ? addBusinessDays(calledOn, rules.validDays, rules.calendar) : addCalendarDays(calledOn, rules.validDays),
  };
}

export type LocateStatus = 'missing' | 'waiting' | 'ready' | 'expired';
export const LOCATE_STATUS_LABELS: Record<LocateStatus, string> = {
  missing: 'No locate ticket on file',
  waiting: 'Ticket on file; wait for the marks',
  ready: 'Ticket on file and current',
  expired: 'Ticket expired',
};

export function locateStatus(ticketNumber: string | null, calledOn: string | null, today: string, rules: LocateRules): { status: LocateStatus; digFrom: string | null; expiresOn: string | null } {
  if (!ticketNumber || !calledOn) return { status: 'missing', digFrom: null, expiresOn: null };
  const { digFrom, expiresOn } = locateDates(calledOn, rules);
  const status: LocateStatus = today > expiresOn ? 'expired' : today < digFrom ? 'waiting' : 'ready';
  return { status, digFrom, expiresOn };
}

/**
 * The stage gate: building needs a locate ticket on file and not expired, unless the
 * owner has put a written override on file.
 */
export function buildingGate(status: LocateStatus, overrideReason: string | null): { ok: boolean; message: string } {
  if (status === 'ready' || status === 'waiting') return { ok: true, message: '' };
  if (overrideReason) return { ok: true, message: `Owner override on file: ${overrideReason}` };
  return {
    ok: false,
    message: status === 'expired'
      ? 'The locate ticket has expired. Call in a new ticket before the job moves to building (or the owner records an override with a reason).'
      : 'Put the utility-locate ticket on file before the job moves to building (or the owner records an override with a reason).',
  };
}

/**
 * What the checklist says of the ticket for the job's stage: before building it is the
 * gate; once the crew is on site a lapsed ticket matters for any digging left; after the
 * job is finished it is a record.
 */
export function gateAdvice(status: LocateStatus, overrideReason: string | null, jobStatus: string): { ok: boolean; message: string } {
  const gate = buildingGate(status, overrideReason);
  if (jobStatus === 'building' && !gate.ok) {
    return {
      ok: false,
      message: status === 'expired'
        ? 'The locate ticket has expired while the job is being built. If any digging is left, call in a new ticket and wait for the marks first.'
        : 'No locate ticket is on file for a job being built. Put it on file before anyone digs (or the owner records an override with a reason).',
    };
  }
  if (jobStatus === 'completed' || jobStatus === 'closed' || jobStatus === 'lost') return { ok: true, message: 'The job is past digging; the checklist stays as its record.' };
  return gate.ok ? { ok: true, message: gate.message || 'The job may move to building.' } : gate;
}

/** Whether the fence needs a permit by the company's height limits per yard position. */
export function permitNeeded(runs: readonly { heightIn: number; yard: YardPosition }[], limits: Record<YardPosition, number | null>): { needed: boolean | null; reasons: string[] } {
  if (!runs.length) return { needed: null, reasons: [] };
  const reasons = runs.flatMap((r) => {
    const lim = limits[r.yard];
    return lim != null && r.heightIn > lim ? [`${r.heightIn} in in the ${YARD_LABELS[r.yard].toLowerCase()} is over the ${lim} in limit`] : [];
  });
  const known = runs.every((r) => limits[r.yard] != null);
  return { needed: reasons.length ? true : known ? false : null, reasons: [...new Set(reasons)] };
}

const optionalText = (max: number) => z.string().trim().max(max, `At most ${max} characters.`).nullish().transform((v) => (v ? v : null));
const optionalDate = z.string().trim().nullish().transform((v) => (v ? v : null)).refine((v) => v === null || isIsoDate(v), 'Use a date such as 2026-05-14.');

export const checklistInput = z.strictObject({
  locateTicketNumber: optionalText(60),
  locateCalledOn: optionalDate,
  permitRequired: z.enum(['yes', 'no', 'unknown']).optional(),
  permitNumber: optionalText(60),
  hoaRequired: z.boolean().optional(),
  hoaApprovedOn: optionalDate,
  propertyLineConfirmed: z.boolean().optional(),
  propertyLineNote: optionalText(500),
}).superRefine((v, ctx) => {
  if (v.locateTicketNumber && !v.locateCalledOn) ctx.addIssue({ code: 'custom', path: ['locateCalledOn'], message: 'Give the date the ticket was called in.' });
  if (v.locateCalledOn && !v.locateTicketNumber) ctx.addIssue({ code: 'custom', path: ['locateTicketNumber'], message: 'Give the ticket number.' });
});
export type ChecklistInput = z.output<typeof checklistInput>;

export const overrideInput = z.strictObject({
  reason: z.string().trim().min(15, 'Write the reason in a sentence (at least 15 characters).').max(1000),
});
