import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { ChecklistInput } from '../../lib/checklist/checklist.ts';

type Q = Knex | Knex.Transaction;

export interface ChecklistRow {
  locateTicketNumber: string | null;
  locateCalledOn: string | null;
  permitRequired: 'yes' | 'no' | 'unknown';
  permitNumber: string | null;
  hoaRequired: boolean;
  hoaApprovedOn: string | null;
  propertyLineConfirmed: boolean;
  propertyLineNote: string | null;
  overrideReason: string | null;
  overrideByName: string | null;
  overrideAt: string | null;
  updatedAt: string | null;
}

const EMPTY: ChecklistRow = {
  locateTicketNumber: null, locateCalledOn: null, permitRequired: 'unknown', permitNumber: null, hoaRequired: false, hoaApprovedOn: null,
  propertyLineConfirmed: false, propertyLineNote: null, overrideReason: null, overrideByName: null, overrideAt: null, updatedAt: null,
};

export async function findChecklist(companyId: string, jobId: number, q: Q = db()): Promise<ChecklistRow> {
  const r = await q('job_checklists as c').leftJoin('user as u', 'u.id', 'c.override_by').where({ 'c.organization_id': companyId, 'c.job_id': jobId }).first('c.*', 'u.name as override_by_name');
  if (!r) return { ...EMPTY };
  return {
    locateTicketNumber: r.locate_ticket_number ?? null, locateCalledOn: r.locate_called_on ?? null, permitRequired: r.permit_required,
    permitNumber: r.permit_number ?? null, hoaRequired: Boolean(r.hoa_required), hoaApprovedOn: r.hoa_approved_on ?? null,
    propertyLineConfirmed: Boolean(r.property_line_confirmed), propertyLineNote: r.property_line_note ?? null,
    overrideReason: r.override_reason ?? null, overrideByName: r.override_by_name ?? null, overrideAt: r.override_at ? new Date(r.override_at).toISOString() : null,
    updatedAt: r.updated_at ? new Date(r.updated_at).toISOString() : null,
  };
}

const COLUMNS: Record<keyof ChecklistInput, string> = {
  locateTicketNumber: 'locate_ticket_number', locateCalledOn: 'locate_called_on', permitRequired: 'permit_required', permitNumber: 'permit_number',
  hoaRequired: 'hoa_required', hoaApprovedOn: 'hoa_approved_on', propertyLineConfirmed: 'property_line_confirmed', propertyLineNote: 'property_line_note',
};

export async function saveChecklist(companyId: string, jobId: number, input: Partial<ChecklistInput>, extra: Record<string, unknown>, userId: string, trx: Knex.Transaction): Promise<void> {
  const row: Record<string, unknown> = { ...extra, updated_by: userId };
  for (const [k, col] of Object.entries(COLUMNS)) if (k in input && (input as Record<string, unknown>)[k] !== undefined) row[col] = (input as Record<string, unknown>)[k];
  // Insert-or-ignore, then update: no lock on a row that may not exist yet (a gap lock).
  await trx('job_checklists').insert({ organization_id: companyId, job_id: jobId }).onConflict(['organization_id', 'job_id']).ignore();
  await trx('job_checklists').where({ organization_id: companyId, job_id: jobId }).update({ ...row, updated_at: trx.fn.now(3) });
}

/** Runs of the accepted bid, or of the latest version when none is accepted. */
export async function bidRuns(companyId: string, jobId: number, q: Q = db()): Promise<{ heightIn: number; yard: 'front' | 'side' | 'back' }[]> {
  const r = await q('bids').where({ organization_id: companyId, job_id: jobId }).orderByRaw("status = 'accepted' DESC").orderBy('version_no', 'desc').first('input');
  if (!r) return [];
  const input = typeof r.input === 'string' ? JSON.parse(r.input) : r.input;
  return (input.runs ?? []).map((x: { heightIn: number; yard?: string }) => ({ heightIn: Number(x.heightIn), yard: (x.yard ?? 'back') as 'front' | 'side' | 'back' }));
}
