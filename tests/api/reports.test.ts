import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { styleId } from '../setup/bids';
import { buildJobs, type BuiltJob } from '../setup/margins';
import { parseCsv } from '../../src/lib/csv/tokenizer';
import { centsText } from '../../src/lib/csv/write';

let co: TestCompany;
let other: TestCompany;
let jobs: BuiltJob[];
let wood: number;
let chain: number;

beforeAll(async () => {
  [co, other] = await Promise.all([makeCompany(), makeCompany()]);
  jobs = await buildJobs(co, [
    { style: 'wood_privacy', status: 'completed', lengthFt: 120, labour: 1.3, completedDate: '2026-02-10', billPct: 50, paidPct: 100, byEstimator: true },
    { style: 'wood_privacy', status: 'closed', lengthFt: 80, labour: 1.25, completedDate: '2026-03-15', changeOrder: { priceCents: 45_000, materialCents: 20_000 }, rentalCents: 9_500 },
    { style: 'wood_privacy', status: 'completed', lengthFt: 150, labour: 1.2, completedDate: '2026-04-20' },
    { style: 'chain_link', status: 'completed', lengthFt: 200, concrete: 1.5, completedDate: '2026-03-01', byEstimator: true },
    { style: 'chain_link', status: 'completed', lengthFt: 90, concrete: 1.6, completedDate: '2026-04-02', billPct: 60, paidPct: 40 },
    { style: 'wood_privacy', status: 'building', lengthFt: 100, labour: 0.4, billPct: 40, paidPct: 50 },
    { style: 'chain_link', status: 'won', lengthFt: 60 },
  ]);
  await buildJobs(other, [{ style: 'wood_privacy', status: 'completed', lengthFt: 50, completedDate: '2026-02-11' }]);
  [wood, chain] = [await styleId(co.owner, 'wood_privacy'), await styleId(co.owner, 'chain_link')];
}, 600_000);
afterAll(closeTestDb);

/** The figures per job written independently of the app: correlated subqueries over the same rows. */
async function sqlJobs(companyId: string, statuses: string[]) {
  const [rows] = await testDb().raw(
    `SELECT j.id, j.fence_style_id AS style,
       j.contract_cents + COALESCE((SELECT SUM(c.price_cents) FROM change_orders c WHERE c.job_id = j.id AND c.status = 'approved'), 0) AS revenue,
       COALESCE((SELECT SUM(l.amount_cents) FROM cost_lines l WHERE l.job_id = j.id), 0)
         + COALESCE((SELECT SUM(t.cost_cents) FROM time_entries t WHERE t.job_id = j.id), 0)
         + COALESCE((SELECT SUM(r.cost_cents) FROM rentals r WHERE r.job_id = j.id), 0) AS cost,
       COALESCE((SELECT SUM(e.amount_cents) FROM job_estimates e WHERE e.job_id = j.id), 0) AS est,
       COALESCE((SELECT SUM(i.contract_billed_cents) FROM invoices i WHERE i.job_id = j.id AND i.status IN ('issued', 'partly_paid', 'paid')), 0) AS billed,
       COALESCE((SELECT SUM(i.paid_cents) FROM invoices i WHERE i.job_id = j.id AND i.status IN ('issued', 'partly_paid', 'paid')), 0) AS collected,
       (SELECT b.total_length_ft FROM bids b WHERE b.job_id = j.id AND b.status = 'accepted') AS ft
     FROM jobs j WHERE j.organization_id = ? AND j.status IN (${statuses.map(() => '?').join(',')}) ORDER BY j.id`,
    [companyId, ...statuses],
  );
  return (rows as Record<string, unknown>[]).map((r) => ({ id: Number(r.id), style: Number(r.style), revenue: Number(r.revenue), cost: Number(r.cost), est: Number(r.est), billed: Number(r.billed), collected: Number(r.collected), ft: Number(r.ft) }));
}

const round1 = (x: number) => (Math.sign(x) * Math.round(Math.abs(x) * 10)) / 10;
const pct = (n: number, d: number) => (d ? round1((n / d) * 100) : null);

describe('margins by style', () => {
  it('equals an independent SQL aggregate over the same rows, job by job and style by style', async () => {
    const r = await co.owner.get('/api/reports/margin-by-style');
    expect(r.status).toBe(200);
    expect(r.body.jobs).toBeUndefined();
    const list = await co.owner.get('/api/reports/jobs');
    const sql = await sqlJobs(co.id, ['completed', 'closed']);
    expect(list.body.jobs).toHaveLength(5);
    for (const s of sql) {
      const j = list.body.jobs.find((x: { jobId: number }) => x.jobId === s.id);
      expect(j, `job ${s.id}`).toMatchObject({ contractCents: s.revenue, costToDateCents: s.cost, estimatedCostCents: s.est, billedCents: s.billed, collectedCents: s.collected, grossProfitCents: s.revenue - s.cost, marginPct: pct(s.revenue - s.cost, s.revenue), linearFt: s.ft });
    }
    for (const id of [wood, chain]) {
      const mine = sql.filter((s) => s.style === id);
      const sum = (k: 'revenue' | 'cost' | 'est' | 'ft') => mine.reduce((a, s) => a + s[k], 0);
      const row = r.body.styles.find((s: { styleId: number }) => s.styleId === id);
      const gp = sum('revenue') - sum('cost');
      expect(row).toMatchObject({ jobs: mine.length, revenueCents: sum('revenue'), costCents: sum('cost'), estimatedCostCents: sum('est'), grossProfitCents: gp, marginPct: pct(gp, sum('revenue')), estimatedMarginPct: pct(sum('revenue') - sum('est'), sum('revenue')) });
      expect(row.linearFt).toBeCloseTo(sum('ft'), 6);
      expect(row.grossProfitPerFtCents).toBe(Math.round(gp / sum('ft')));
    }
    expect(r.body.total.revenueCents).toBe(sql.reduce((a, s) => a + s.revenue, 0));
    // The story the rows tell: wood privacy crews ran 20–30 % over, so those jobs made less than their bids planned.
    const w = r.body.styles.find((s: { styleId: number }) => s.styleId === wood);
    expect(w.marginPct).toBeLessThan(w.estimatedMarginPct);
  });

  it('sums cost by group from every source, rentals included', async () => {
    const closed = jobs[1];
    const r = await co.owner.get('/api/reports/jobs?status=closed');
    const j = r.body.jobs.find((x: { jobId: number }) => x.jobId === closed.jobId);
    const [[t]] = await testDb().raw('SELECT SUM(cost_cents) AS s FROM time_entries WHERE job_id = ?', [closed.jobId]);
    const [[m]] = await testDb().raw("SELECT SUM(amount_cents) AS s FROM cost_lines WHERE job_id = ? AND category = 'material'", [closed.jobId]);
    expect(j.actual).toEqual({ material: Number(m.s), labour: Number(t.s), rental: 9_500, other: 0 });
    expect(j.approvedChangeOrdersCents).toBe(45_000);
    expect(j.final).toBe(true);
  });

  it('filters by style, estimator, status and date range, the same on every endpoint', async () => {
    const byStyle = await co.owner.get(`/api/reports/margin-by-style?style=${chain}`);
    expect(byStyle.body.styles).toHaveLength(1);
    expect(byStyle.body.total.jobs).toBe(2);
    expect((await co.owner.get(`/api/reports/jobs?style=${chain}`)).body.jobs.map((j: { styleId: number }) => j.styleId)).toEqual([chain, chain]);
    const byEst = await co.owner.get(`/api/reports/jobs?estimator=${co.userIds.estimator}`);
    expect(byEst.body.jobs.map((j: { jobId: number }) => j.jobId).sort()).toEqual([jobs[0].jobId, jobs[3].jobId].sort());
    const range = await co.owner.get('/api/reports/jobs?from=2026-03-01&to=2026-03-31');
    expect(range.body.jobs.map((j: { reportDate: string }) => j.reportDate).sort()).toEqual(['2026-03-01', '2026-03-15']);
    const open = await co.owner.get('/api/reports/jobs?status=building,won');
    expect(open.body.jobs.map((j: { jobId: number }) => j.jobId).sort()).toEqual([jobs[5].jobId, jobs[6].jobId].sort());
    const months = await co.owner.get('/api/reports/margin-by-month?style=' + wood);
    expect(months.body.months.map((x: { month: string; jobs: number }) => `${x.month}:${x.jobs}`)).toEqual(['2026-02:1', '2026-03:1', '2026-04:1']);
  });

  it('refuses filters nobody could mean, with field errors', async () => {
    for (const [q, field] of [['style=abc', 'style'], ['status=lead', 'status'], ['from=2026-02-30', 'from'], ['from=2026-05-01&to=2026-04-01', 'to'], ['colour=red', '_']] as const) {
      const r = await co.owner.get(`/api/reports/margin-by-style?${q}`);
      expect(r.status, q).toBe(400);
      expect(Object.keys(r.body.error.fields), q).toContain(field);
    }
    expect((await co.owner.get('/api/reports/wip?status=completed')).status).toBe(400);
  });

  it('exports CSV whose numbers match the JSON to the cent', async () => {
    const json = (await co.owner.get('/api/reports/margin-by-style')).body;
    const csv = await co.owner.get('/api/reports/margin-by-style?format=csv');
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/margin-by-style-\d{4}-\d{2}-\d{2}\.csv/);
    const rows = parseCsv(csv.text).map((r) => r.cells);
    const head = rows[0];
    const col = (name: string) => head.indexOf(name);
    for (const s of [...json.styles, json.total]) {
      const row = rows.find((r) => r[0] === s.styleName)!;
      expect(row[col('Revenue')]).toBe(centsText(s.revenueCents));
      expect(row[col('Gross profit')]).toBe(centsText(s.grossProfitCents));
      expect(row[col('Gross profit per ft')]).toBe(centsText(s.grossProfitPerFtCents));
      expect(Number(row[col('Gross margin %')])).toBe(s.marginPct);
    }
    const jcsv = parseCsv((await co.owner.get('/api/reports/jobs?format=csv')).text).map((r) => r.cells);
    const total = jcsv.find((r) => r[0] === 'Total')!;
    expect(total[jcsv[0].indexOf('Contract')]).toBe(centsText(json.total.revenueCents));
    expect(jcsv).toHaveLength(json.total.jobs + 2);
  });

  it('keeps each company to its own jobs', async () => {
    const r = await other.owner.get('/api/reports/jobs');
    expect(r.body.jobs).toHaveLength(1);
    expect(r.body.jobs[0].code).not.toBe(undefined);
    const mine = (await co.owner.get('/api/reports/jobs')).body.jobs.map((j: { jobId: number }) => j.jobId);
    expect(mine).not.toContain(r.body.jobs[0].jobId);
  });
});

describe('work in progress', () => {
  it('percent complete by cost, earned, billed and over/under billing equal the rows', async () => {
    const r = await co.bookkeeper.get('/api/reports/wip');
    expect(r.status).toBe(200);
    const sql = await sqlJobs(co.id, ['won', 'building']);
    expect(r.body.jobs).toHaveLength(2);
    for (const s of sql) {
      const j = r.body.jobs.find((x: { jobId: number }) => x.jobId === s.id);
      const frac = Math.min(1, s.cost / s.est);
      const exact = s.revenue * frac;
      // Earned is rounded half to even to the cent.
      const earned = Math.abs(exact % 1) === 0.5 ? 2 * Math.round(exact / 2) : Math.round(exact);
      expect(j).toMatchObject({ contractCents: s.revenue, costToDateCents: s.cost, estimatedCostCents: s.est, billedCents: s.billed, earnedCents: earned, overUnderCents: s.billed - earned, percentComplete: round1(frac * 100) });
    }
    const t = r.body.totals;
    expect(t.netOverUnderCents).toBe(t.billedToDateCents - t.earnedCents);
    expect(t.billedToDateCents).toBe(sql.reduce((a, s) => a + s.billed, 0));
    const csv = parseCsv((await co.owner.get('/api/reports/wip?format=csv')).text).map((x) => x.cells);
    const total = csv.find((x) => x[0] === 'Total')!;
    expect(total[csv[0].indexOf('Earned revenue')]).toBe(centsText(t.earnedCents));
    expect(total[csv[0].indexOf('Over (+) or under (-) billed')]).toBe(centsText(t.netOverUnderCents));
  });
});

describe('who may see margins', () => {
  it('owner, bookkeeper and estimator read margins; only owner and bookkeeper the work in progress; a crew lead nothing', async () => {
    for (const path of ['/api/reports/margin-by-style', '/api/reports/jobs', '/api/reports/margin-by-month']) {
      for (const role of ['owner', 'bookkeeper', 'estimator'] as const) expect((await co.as(role).get(path)).status, `${role} ${path}`).toBe(200);
      expect((await co.crew_lead.get(path)).status, path).toBe(403);
      expect((await co.crew_lead.get(`${path}?format=csv`)).status, path).toBe(403);
    }
    expect((await co.estimator.get('/api/reports/wip')).status).toBe(403);
    expect((await co.crew_lead.get('/api/reports/wip')).status).toBe(403);
    expect((await co.owner.get('/api/reports/wip')).status).toBe(200);
  });

  it('shows the margin panel and tiles to those who may see them, and not to a crew lead', async () => {
    const page = await co.owner.get(`/jobs/${jobs[0].jobId}`);
    expect(page.text).toContain('data-testid="margin-panel"');
    const [[r]] = await testDb().raw('SELECT contract_cents AS c FROM jobs WHERE id = ?', [jobs[0].jobId]);
    expect(page.text).toContain(`$${(Number(r.c) / 100).toLocaleString('en-US', { minimumFractionDigits: 2 })}`);
    expect((await co.owner.get('/')).text).toContain('data-testid="margin-tiles"');
    const crew = await co.crew_lead.get(`/jobs/${jobs[0].jobId}`);
    expect(crew.status).toBe(200);
    expect(crew.text).not.toContain('margin-panel');
    expect((await co.crew_lead.get('/')).text).not.toContain('margin-tiles');
    for (const p of ['/margins', '/wip']) expect((await co.crew_lead.get(p)).text).not.toContain('data-testid="margins-screen"');
  });
});

describe('CSV safety', () => {
  it('writes a job title and customer name that look like formulas as text in the report CSVs', async () => {
    // A finished job (in the jobs report) and an open one (in work in progress).
    const done = jobs.find((j) => j.spec.status === 'completed')!;
    const open = jobs.find((j) => j.spec.status === 'building')!;
    const title = '=HYPERLINK("http://evil.example","Open me")';
    const customer = '@SUM(1+1)';
    for (const j of [done, open]) {
      // Status and commercial are sent as they are: the job patch fills defaults for missing ones.
      const now = (await co.owner.get(`/api/jobs/${j.jobId}`)).body;
      expect((await co.owner.patch(`/api/jobs/${j.jobId}`, { title, status: now.status, commercial: now.commercial })).status).toBe(200);
    }
    const customerId = (await co.owner.get(`/api/jobs/${done.jobId}`)).body.customerId as number;
    expect((await co.owner.patch(`/api/customers/${customerId}`, { name: customer })).status).toBe(200);
    for (const path of ['/api/reports/jobs?format=csv', '/api/reports/wip?format=csv']) {
      const r = await co.owner.get(path);
      expect(r.status, path).toBe(200);
      const cells = parseCsv(r.text).flatMap((row) => row.cells);
      expect(cells, path).toContain(`'${title}`);
      // No cell starts as a spreadsheet formula would; negative numbers are numbers we wrote.
      expect(cells.filter((c) => /^[=+@\t\r]/.test(c) || /^-(?![0-9])/.test(c)), path).toEqual([]);
      expect(r.text, path).not.toMatch(/(^|,)"?=HYPERLINK/m);
    }
    expect(parseCsv((await co.owner.get('/api/reports/jobs?format=csv')).text).flatMap((row) => row.cells)).toContain(`'${customer}`);
  });
});
