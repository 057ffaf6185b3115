import { testDb } from './db.ts';

/**
 * job_cost_totals (kept by triggers) against the same sums taken from the three sources
 * directly: the rows that differ, by job and category, for one company.
 */
export async function costTotalsDrift(companyId: string): Promise<{ jobId: number; category: string; totals: number; raw: number }[]> {
  const [rows] = await testDb().raw(
    `SELECT r.job_id, r.category, COALESCE(t.amount_cents, 0) AS totals, r.cents AS raw FROM (
       SELECT job_id, category, SUM(cents) AS cents FROM (
         SELECT job_id, category, amount_cents AS cents FROM cost_lines WHERE organization_id = ? AND job_id IS NOT NULL
         UNION ALL SELECT job_id, 'labour', IFNULL(cost_cents, 0) FROM time_entries WHERE organization_id = ?
         UNION ALL SELECT job_id, 'rental', cost_cents FROM rentals WHERE organization_id = ? AND cost_cents IS NOT NULL
       ) u GROUP BY job_id, category
     ) r LEFT JOIN job_cost_totals t ON t.job_id = r.job_id AND t.category = r.category
     UNION ALL
     SELECT t.job_id, t.category, t.amount_cents, 0 FROM job_cost_totals t
      WHERE t.organization_id = ? AND t.amount_cents <> 0 AND NOT EXISTS (
        SELECT 1 FROM cost_lines c WHERE c.job_id = t.job_id AND c.category = t.category
        UNION ALL SELECT 1 FROM time_entries e WHERE e.job_id = t.job_id AND t.category = 'labour'
        UNION ALL SELECT 1 FROM rentals x WHERE x.job_id = t.job_id AND t.category = 'rental' AND x.cost_cents IS NOT NULL)`,
    [companyId, companyId, companyId, companyId],
  );
  return (rows as Record<string, unknown>[])
    .map((r) => ({ jobId: Number(r.job_id), category: String(r.category), totals: Number(r.totals), raw: Number(r.raw) }))
    .filter((r) => r.totals !== r.raw);
}
