import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { JobFigures } from '../../lib/margins/job.ts';
import type { JobStatus } from '../../lib/jobs/schema.ts';

type Q = Knex | Knex.Transaction;

export interface FigureFilter {
  from?: string;
  to?: string;
  style?: number[];
  estimator?: string[];
  status: readonly string[];
  jobId?: number;
}

/** The day a job counts on in the reports: completed, else started, else won. */
export const REPORT_DATE_SQL = 'COALESCE(j.completed_date, j.start_date, j.decided_date)';

const OTHER = "'subcontract','permit','disposal','other'";
const groupSums = (col: string, amount: string) =>
  `SUM(CASE WHEN ${col} = 'material' THEN ${amount} ELSE 0 END) AS material,
   SUM(CASE WHEN ${col} = 'labour' THEN ${amount} ELSE 0 END) AS labour,
   SUM(CASE WHEN ${col} = 'rental' THEN ${amount} ELSE 0 END) AS rental,
   SUM(CASE WHEN ${col} IN (${OTHER}) THEN ${amount} ELSE 0 END) AS other`;

/**
 * Every figure the margin reports need, one row per job, in one statement: actual cost by
 * group from job_cost_totals (cost lines, crew hours and priced rentals summed by job and
 * category, kept in step by triggers; see its migration), estimated cost by group, approved
 * change orders, billed and collected, and the accepted bid's length. Filters apply to the jobs; every branch is scoped to the company.
 */
export function jobFiguresQuery(q: Q, companyId: string, f: FigureFilter): Knex.Raw {
  const where: string[] = ['j.organization_id = ?'];
  const args: (string | number)[] = [];
  const c = companyId;
  if (f.status.length) { where.push(`j.status IN (${f.status.map(() => '?').join(',')})`); args.push(...f.status); }
  if (f.style?.length) { where.push(`j.fence_style_id IN (${f.style.map(() => '?').join(',')})`); args.push(...f.style); }
  if (f.estimator?.length) { where.push(`j.estimator_user_id IN (${f.estimator.map(() => '?').join(',')})`); args.push(...f.estimator); }
  if (f.from) { where.push(`${REPORT_DATE_SQL} >= ?`); args.push(f.from); }
  if (f.to) { where.push(`${REPORT_DATE_SQL} <= ?`); args.push(f.to); }
  if (f.jobId) { where.push('j.id = ?'); args.push(f.jobId); }
  const sql = `
SELECT j.id, j.code, j.title, j.status, j.fence_style_id, s.name AS style_name, j.estimator_user_id, ue.name AS estimator_name,
       cu.name AS customer_name, ${REPORT_DATE_SQL} AS report_date, j.contract_cents,
       COALESCE(co.cents, 0) AS co_cents,
       COALESCE(e.material, 0) AS e_material, COALESCE(e.labour, 0) AS e_labour, COALESCE(e.rental, 0) AS e_rental, COALESCE(e.other, 0) AS e_other,
       COALESCE(a.material, 0) AS a_material, COALESCE(a.labour, 0) AS a_labour, COALESCE(a.rental, 0) AS a_rental, COALESCE(a.other, 0) AS a_other,
       COALESCE(i.billed, 0) AS billed, COALESCE(i.collected, 0) AS collected, b.linear_ft
FROM jobs j
JOIN customers cu ON cu.id = j.customer_id AND cu.organization_id = j.organization_id
LEFT JOIN fence_styles s ON s.id = j.fence_style_id AND s.organization_id = j.organization_id
LEFT JOIN \`user\` ue ON ue.id = j.estimator_user_id
LEFT JOIN (
  SELECT t.job_id, ${groupSums('t.category', 't.amount_cents')}
  FROM job_cost_totals t WHERE t.organization_id = ? GROUP BY t.job_id
) a ON a.job_id = j.id
LEFT JOIN (
  SELECT je.job_id, ${groupSums('je.category', 'je.amount_cents')} FROM job_estimates je WHERE je.organization_id = ? GROUP BY je.job_id
) e ON e.job_id = j.id
LEFT JOIN (
  SELECT x.job_id, SUM(x.price_cents) AS cents FROM change_orders x WHERE x.organization_id = ? AND x.status = 'approved' GROUP BY x.job_id
) co ON co.job_id = j.id
LEFT JOIN (
  SELECT v.job_id, SUM(v.contract_billed_cents) AS billed, SUM(v.paid_cents) AS collected FROM invoices v
   WHERE v.organization_id = ? AND v.status IN ('issued', 'partly_paid', 'paid') GROUP BY v.job_id
) i ON i.job_id = j.id
LEFT JOIN (
  SELECT bb.job_id, MAX(bb.total_length_ft) AS linear_ft FROM bids bb WHERE bb.organization_id = ? AND bb.status = 'accepted' GROUP BY bb.job_id
) b ON b.job_id = j.id
WHERE ${where.join(' AND ')}
ORDER BY j.code`;
  return q.raw(sql, [c, c, c, c, c, c, ...args]);
}

const groups = (r: Record<string, unknown>, p: 'e' | 'a') => ({
  material: toInt(r[`${p}_material`]), labour: toInt(r[`${p}_labour`]), rental: toInt(r[`${p}_rental`]), other: toInt(r[`${p}_other`]),
});

export async function jobFigures(companyId: string, f: FigureFilter, q: Q = db()): Promise<JobFigures[]> {
  const [rows] = (await jobFiguresQuery(q, companyId, f)) as unknown as [Record<string, unknown>[]];
  return rows.map((r) => ({
    jobId: Number(r.id), code: String(r.code), title: String(r.title), status: r.status as JobStatus, customerName: String(r.customer_name),
    styleId: r.fence_style_id == null ? null : Number(r.fence_style_id), styleName: (r.style_name as string) ?? null,
    estimatorUserId: (r.estimator_user_id as string) ?? null, estimatorName: (r.estimator_name as string) ?? null,
    reportDate: (r.report_date as string) ?? null,
    contractBaseCents: r.contract_cents == null ? null : toInt(r.contract_cents), approvedChangeOrdersCents: toInt(r.co_cents),
    estimated: groups(r, 'e'), actual: groups(r, 'a'), billedCents: toInt(r.billed), collectedCents: toInt(r.collected),
    linearFt: r.linear_ft == null ? null : Number(r.linear_ft),
  }));
}

/** The styles and estimators the filters offer: every style of the company, everyone who estimated a job. */
export async function filterOptions(companyId: string, q: Q = db()) {
  const styles = await q('fence_styles').where('organization_id', companyId).orderBy('name').select('id', 'name');
  const estimators = await q('jobs as j').join('user as u', 'u.id', 'j.estimator_user_id').where('j.organization_id', companyId).distinct('u.id', 'u.name').orderBy('u.name');
  return {
    styles: styles.map((s) => ({ id: Number(s.id), name: String(s.name) })),
    estimators: estimators.map((e) => ({ id: String(e.id), name: String(e.name) })),
  };
}
