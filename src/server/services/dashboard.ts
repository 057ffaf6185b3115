import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { scopeFor } from './jobs.ts';
import type { JobStatus } from '../../lib/jobs/schema.ts';
import { locateStatus, type LocateStatus } from '../../lib/checklist/checklist.ts';
import { companyRules, companyToday } from './bids.ts';

/** Jobs per status for the dashboard (a crew lead's own jobs only). */
export async function jobCountsByStatus(actor: Actor): Promise<Partial<Record<JobStatus, number>>> {
  const q = db()('jobs').where('organization_id', actor.companyId);
  const scope = scopeFor(actor);
  if (scope.crewLeadUserId) q.andWhere('crew_lead_user_id', scope.crewLeadUserId);
  const rows = (await q.groupBy('status').select('status').count({ n: '*' })) as { status: JobStatus; n: number | string }[];
  return Object.fromEntries(rows.map((r) => [r.status, Number(r.n)]));
}

export interface CrewBoardJob {
  id: number;
  code: string;
  title: string;
  status: JobStatus;
  startDate: string | null;
  site: string;
  locate: { status: LocateStatus; digFrom: string | null; expiresOn: string | null };
  overridden: boolean;
}

/**
 * A crew lead's work ahead: their jobs won or building, soonest start first (unscheduled
 * last), each with where its locate ticket stands today by the company's rules.
 */
export async function crewBoard(actor: Actor): Promise<{ today: string; jobs: CrewBoardJob[] }> {
  const [rows, { locate }, today] = await Promise.all([
    db()('jobs as j')
      .leftJoin('job_checklists as c', function () {
        this.on('c.job_id', 'j.id').andOn('c.organization_id', 'j.organization_id');
      })
      .where({ 'j.organization_id': actor.companyId, 'j.crew_lead_user_id': actor.userId })
      .whereIn('j.status', ['won', 'building'])
      .orderByRaw('j.start_date IS NULL, j.start_date, j.code')
      .limit(50)
      .select('j.id', 'j.code', 'j.title', 'j.status', 'j.start_date', 'j.site_line1', 'j.site_city', 'c.locate_ticket_number', 'c.locate_called_on', 'c.override_reason'),
    companyRules(actor.companyId),
    companyToday(actor.companyId),
  ]);
  const jobs = rows.map((r): CrewBoardJob => {
    const ls = locateStatus(r.locate_ticket_number ?? null, r.locate_called_on ?? null, today, locate);
    return {
      id: Number(r.id), code: r.code, title: r.title, status: r.status, startDate: r.start_date ?? null,
      site: [r.site_line1, r.site_city].filter(Boolean).join(', '),
      locate: ls, overridden: Boolean(r.override_reason),
    };
  });
  return { today, jobs };
}
