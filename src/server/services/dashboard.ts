import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { scopeFor } from './jobs.ts';
import type { JobStatus } from '../../lib/jobs/schema.ts';

/** Jobs per status for the dashboard (a crew lead's own jobs only). */
export async function jobCountsByStatus(actor: Actor): Promise<Partial<Record<JobStatus, number>>> {
  const q = db()('jobs').where('organization_id', actor.companyId);
  const scope = scopeFor(actor);
  if (scope.crewLeadUserId) q.andWhere('crew_lead_user_id', scope.crewLeadUserId);
  const rows = (await q.groupBy('status').select('status').count({ n: '*' })) as { status: JobStatus; n: number | string }[];
  return Object.fromEntries(rows.map((r) => [r.status, Number(r.n)]));
}
