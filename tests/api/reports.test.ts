import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeCompany, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { styleId } from '../setup/bids';
import { buildJobs, type BuiltJob } from '../setup/margins';
import { parseCsv } from '../../src/lib/csv/tokenizer';
import { centsText } from '../../src/lib/csv/write';
import { formatMoney } from '../../src/lib/format';

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
    // Open and already past its labour estimate: its current estimate of total cost is above the bid's.
    { style: 'chain_link', status: 'building', lengthFt: 70, labour: 1.6, billPct: 70 },
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

/** Estimated and actual cost by report group per job, from the same rows, written apart from the app. */
async function sqlGroups(companyId: string, statuses: string[]) {
  const grp = (col: string) => `CASE WHEN ${col} IN ('material', 'labour', 'rental') THEN ${col} ELSE 'other' END`;
  const [rows] = await testDb().raw(
    `SELECT x.job_id, x.side, x.grp, SUM(x.cents) AS cents FROM (
       SELECT e.job_id, 'est' AS side, ${grp('e.category')} AS grp, e.amount_cents AS cents FROM job_estimates e WHERE e.organization_id = ?
       UNION ALL SELECT l.job_id, 'act', ${grp('l.category')}, l.amount_cents FROM cost_lines l WHERE l.organization_id = ? AND l.job_id IS NOT NULL
       UNION ALL SELECT t.job_id, 'act', 'labour', t.cost_cents FROM time_entries t WHERE t.organization_id = ?
       UNION ALL SELECT r.job_id, 'act', 'rental', r.cost_cents FROM rentals r WHERE r.organization_id = ? AND r.cost_cents IS NOT NULL
     ) x JOIN jobs j ON j.id = x.job_id WHERE j.status IN (${statuses.map(() => '?').join(',')}) GROUP BY x.job_id, x.side, x.grp`,
    [companyId, companyId, companyId, companyId, ...statuses],
  );
  const by = new Map<number, { est: Record<string, number>; act: Record<string, number> }>();
  for (const r of rows as { job_id: number; side: 'est' | 'act'; grp: string; cents: string }[]) {
    const j = by.get(Number(r.job_id)) ?? { est: {}, act: {} };
    j[r.side][r.grp] = Number(r.cents);
    by.set(Number(r.job_id), j);
  }
  /** The current estimate of total cost: each group at the larger of its estimate and its cost so far. */
  const projected = (id: number) => ['material', 'labour', 'rental', 'other'].reduce((a, g) => a + Math.max(by.get(id)?.est[g] ?? 0, by.get(id)?.act[g] ?? 0), 0);
  return { by, projected };
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
    expect(open.body.jobs.map((j: { jobId: number }) => j.jobId).sort()).toEqual([jobs[5].jobId, jobs[6].jobId, jobs[7].jobId].sort());
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

  it('exports CSV whose every money cell matches the JSON to the cent, row by row, in all four reports', async () => {
    /** A money cell read back to cents: dollars with exactly two decimals. */
    const cents = (cell: string) => {
      expect(cell).toMatch(/^-?\d+\.\d{2}$/);
      return Math.round(Number(cell) * 100);
    };
    type Row = Record<string, any>;
    /**
     * Checks one CSV against its JSON rows: every money column is named here with the JSON
     * figure it must equal (so a money column added to the CSV without a check fails), every
     * row of the JSON has its CSV row (found by its first cell) and nothing else is there.
     */
    async function check(path: string, rows: Row[], key: (r: Row) => string, money: Record<string, (r: Row) => number | null>, other: string[]) {
      const res = await co.owner.get(`${path}${path.includes('?') ? '&' : '?'}format=csv`);
      expect(res.status, path).toBe(200);
      expect(res.headers['content-type']).toMatch(/text\/csv/);
      const [head, ...body] = parseCsv(res.text).map((r) => r.cells);
      expect([...head].sort(), path).toEqual([...Object.keys(money), ...other].sort());
      expect(body.map((r) => r[0]).sort(), path).toEqual(rows.map(key).sort());
      let checked = 0;
      for (const r of rows) {
        const line = body.find((b) => b[0] === key(r))!;
        for (const [header, f] of Object.entries(money)) {
          const want = f(r);
          const cell = line[head.indexOf(header)];
          if (want === null) expect(cell, `${path} ${key(r)} ${header}`).toBe('');
          else { expect(cents(cell), `${path} ${key(r)} ${header}`).toBe(want); checked++; }
        }
      }
      expect(checked).toBeGreaterThan(rows.length);
    }

    const byStyle = (await co.owner.get('/api/reports/margin-by-style')).body;
    await check('/api/reports/margin-by-style', [...byStyle.styles, byStyle.total], (r) => r.styleName, {
      Revenue: (r) => r.revenueCents, Cost: (r) => r.costCents, 'Estimated cost': (r) => r.estimatedCostCents, 'Gross profit': (r) => r.grossProfitCents,
      'Gross profit per ft': (r) => r.grossProfitPerFtCents, 'Revenue per ft': (r) => r.revenuePerFtCents,
      'Material cost per ft': (r) => r.costPerFt.material, 'Labour cost per ft': (r) => r.costPerFt.labour, 'Rental cost per ft': (r) => r.costPerFt.rental, 'Other cost per ft': (r) => r.costPerFt.other,
    }, ['Style', 'Jobs', 'Jobs with a measured length', 'Linear feet', 'Gross margin %', 'Estimated margin %', 'Median job margin %', 'Lower quartile %', 'Upper quartile %', 'Interquartile range, points', 'Mean job margin %']);

    const byMonth = (await co.owner.get('/api/reports/margin-by-month')).body;
    expect(byMonth.months.length).toBeGreaterThanOrEqual(3);
    await check('/api/reports/margin-by-month', byMonth.months, (r) => r.month, {
      Revenue: (r) => r.revenueCents, Cost: (r) => r.costCents, 'Gross profit': (r) => r.grossProfitCents,
    }, ['Month', 'Jobs', 'Gross margin %', 'Estimated margin %']);

    // Every job, open ones too; the total row sums what it shows.
    const jobsJson = (await co.owner.get('/api/reports/jobs?status=won,building,completed,closed')).body;
    const sum = (f: (r: Row) => number) => jobsJson.jobs.reduce((a: number, r: Row) => a + f(r), 0);
    const totalRow = {
      code: 'Total', contractCents: sum((r) => r.contractCents), billedCents: sum((r) => r.billedCents), collectedCents: sum((r) => r.collectedCents),
      estimatedCostCents: sum((r) => r.estimatedCostCents), costToDateCents: sum((r) => r.costToDateCents), grossProfitCents: sum((r) => r.grossProfitCents),
      grossProfitPerFtCents: jobsJson.total.grossProfitPerFtCents,
    };
    expect(totalRow.contractCents).toBe(jobsJson.total.revenueCents);
    await check('/api/reports/jobs?status=won,building,completed,closed', [...jobsJson.jobs, totalRow], (r) => r.code, {
      Contract: (r) => r.contractCents, 'Billed against the contract': (r) => r.billedCents, 'Collected, tax included': (r) => r.collectedCents,
      'Estimated cost': (r) => r.estimatedCostCents, 'Cost to date': (r) => r.costToDateCents, 'Gross profit': (r) => r.grossProfitCents, 'Gross profit per ft': (r) => r.grossProfitPerFtCents,
    }, ['Job', 'Title', 'Customer', 'Style', 'Estimator', 'Status', 'Report date', 'Linear feet', 'Gross margin %', 'Estimated margin %', 'Margin against estimate, points']);

    const wipJson = (await co.owner.get('/api/reports/wip')).body;
    const t = wipJson.totals;
    await check('/api/reports/wip', [...wipJson.jobs, {
      code: 'Total', contractCents: t.contractCents, estimatedCostCents: t.estimatedCostCents, projectedCostCents: t.projectedCostCents, costToDateCents: t.costToDateCents,
      earnedCents: t.earnedCents, billedCents: t.billedToDateCents, overUnderCents: t.netOverUnderCents, projectedGrossProfitCents: t.projectedGrossProfitCents,
    }], (r) => r.code, {
      Contract: (r) => r.contractCents, 'Estimated cost, bid and change orders': (r) => r.estimatedCostCents, 'Estimated total cost, overruns to date included': (r) => r.projectedCostCents,
      'Cost to date': (r) => r.costToDateCents, 'Earned revenue': (r) => r.earnedCents, 'Billed to date': (r) => r.billedCents,
      'Over (+) or under (-) billed': (r) => r.overUnderCents, 'Projected gross profit': (r) => r.projectedGrossProfitCents,
    }, ['Job', 'Title', 'Style', 'Status', 'Percent complete', 'Projected margin %', 'Margin at risk']);
    // The totals are the sums of the rows.
    const wsum = (f: (r: Row) => number) => wipJson.jobs.reduce((a: number, r: Row) => a + f(r), 0);
    expect(t).toMatchObject({ contractCents: wsum((r) => r.contractCents), earnedCents: wsum((r) => r.earnedCents), projectedCostCents: wsum((r) => r.projectedCostCents), netOverUnderCents: wsum((r) => r.overUnderCents) });
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
    const groups = await sqlGroups(co.id, ['won', 'building']);
    expect(r.body.jobs).toHaveLength(3);
    // The job over its labour estimate is not shown as far along as the bid's estimate would say.
    const over = r.body.jobs.find((x: { jobId: number }) => x.jobId === jobs[7].jobId);
    expect(over.overEstimate).toBe(true);
    expect(over.projectedCostCents).toBeGreaterThan(over.estimatedCostCents);
    expect(over.percentComplete).toBeLessThan(round1((over.costToDateCents / over.estimatedCostCents) * 100));
    for (const s of sql) {
      const j = r.body.jobs.find((x: { jobId: number }) => x.jobId === s.id);
      // Cost to cost against the current estimate of total cost (overruns so far kept).
      const current = groups.projected(s.id);
      expect(current).toBeGreaterThanOrEqual(s.cost);
      const frac = current > 0 ? s.cost / current : 0;
      const exact = s.revenue * frac;
      // Earned is rounded half to even to the cent.
      const earned = Math.abs(exact % 1) === 0.5 ? 2 * Math.round(exact / 2) : Math.round(exact);
      expect(j).toMatchObject({ contractCents: s.revenue, costToDateCents: s.cost, estimatedCostCents: s.est, projectedCostCents: current, billedCents: s.billed, earnedCents: earned, overUnderCents: s.billed - earned, percentComplete: round1(frac * 100) });
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

describe("the owner's dashboard tiles", () => {
  let dash: TestCompany;
  let built: BuiltJob[];
  const TARGET = 25;
  // The first day of this quarter by the host's clock: on or before the company's today.
  const now = new Date();
  const qStart = `${now.getUTCFullYear()}-${String(Math.floor(now.getUTCMonth() / 3) * 3 + 1).padStart(2, '0')}-01`;
  const longAgo = new Date(Date.now() - 400 * 86_400_000).toISOString().slice(0, 10);

  beforeAll(async () => {
    dash = await makeCompany();
    expect((await dash.owner.patch('/api/settings', { targetMarginPct: TARGET })).status).toBe(200);
    built = await buildJobs(dash, [
      { style: 'wood_privacy', status: 'completed', lengthFt: 120, labour: 1.3, completedDate: qStart },
      { style: 'wood_privacy', status: 'closed', lengthFt: 90, labour: 1.2, completedDate: qStart },
      { style: 'chain_link', status: 'completed', lengthFt: 150, completedDate: qStart },
      { style: 'chain_link', status: 'completed', lengthFt: 110, concrete: 1.5, completedDate: qStart },
      // Finished more than a year ago, and far cheaper than bid: outside both the quarter and the twelve months.
      { style: 'chain_link', status: 'completed', lengthFt: 100, labour: 0.3, completedDate: longAgo },
      // Open: one far over its labour (at risk), one not started (on its bid's 30 %, above the 25 % target).
      { style: 'wood_privacy', status: 'building', lengthFt: 100, labour: 1.8, billPct: 30 },
      { style: 'chain_link', status: 'won', lengthFt: 80 },
    ]);
  }, 600_000);

  /** A tile's text by its test id in the server-rendered page. */
  const tile = (html: string, id: string) => html.match(new RegExp(`data-testid="${id}"[^>]*>([^<]*)<`))?.[1] ?? null;
  /** The from/to of a link on the page whose address starts with /margins and carries both. */
  const ranges = (html: string) => [...html.matchAll(/href="\/margins\?from=(\d{4}-\d{2}-\d{2})&(?:amp;|#38;)?to=(\d{4}-\d{2}-\d{2})"/g)].map((m) => ({ from: m[1], to: m[2] }));

  it('shows the quarter margin, the jobs at risk and the best and worst styles as an independent computation on the same rows finds them', async () => {
    const page = await dash.owner.get('/');
    expect(page.status).toBe(200);
    const html = page.text;
    expect(ranges(html)).toHaveLength(2);
    const [quarter, year] = ranges(html);
    expect(quarter.from).toBe(qStart);

    // Gross margin of the jobs finished this quarter: Σ(contract − cost) ÷ Σ contract, by SQL.
    const [[q]] = await testDb().raw(
      `SELECT COUNT(*) AS n,
         SUM(j.contract_cents + COALESCE((SELECT SUM(c.price_cents) FROM change_orders c WHERE c.job_id = j.id AND c.status = 'approved'), 0)) AS revenue,
         SUM(COALESCE((SELECT SUM(l.amount_cents) FROM cost_lines l WHERE l.job_id = j.id), 0)
           + COALESCE((SELECT SUM(t.cost_cents) FROM time_entries t WHERE t.job_id = j.id), 0)
           + COALESCE((SELECT SUM(r.cost_cents) FROM rentals r WHERE r.job_id = j.id), 0)) AS cost
       FROM jobs j WHERE j.organization_id = ? AND j.status IN ('completed', 'closed')
        AND COALESCE(j.completed_date, j.start_date, j.decided_date) BETWEEN ? AND ?`, [dash.id, quarter.from, quarter.to]);
    expect(Number(q.n)).toBe(4);
    const qMargin = pct(Number(q.revenue) - Number(q.cost), Number(q.revenue))!;
    expect(tile(html, 'quarter-margin')).toBe(`${qMargin.toFixed(1)} %`);

    // At risk: open jobs whose margin with each cost group at max(estimate, cost so far) is below the target.
    const open = await sqlJobs(dash.id, ['won', 'building']);
    const groups = await sqlGroups(dash.id, ['won', 'building']);
    const risky = open.filter((j) => pct(j.revenue - groups.projected(j.id), j.revenue)! < TARGET);
    expect(risky.map((j) => j.id)).toEqual([built[5].jobId]);
    expect(Number(tile(html, 'at-risk-count'))).toBe(risky.length);
    expect(html).toMatch(new RegExp(`of ${open.length} open, heading below ${TARGET} %`));

    // Best and worst: gross profit per foot over the last twelve months, styles with two or more measured jobs.
    const [styles] = await testDb().raw(
      `SELECT s.name, COUNT(*) AS n, SUM(x.revenue - x.cost) AS gp, SUM(x.ft) AS ft FROM (
         SELECT j.fence_style_id AS style,
           j.contract_cents + COALESCE((SELECT SUM(c.price_cents) FROM change_orders c WHERE c.job_id = j.id AND c.status = 'approved'), 0) AS revenue,
           COALESCE((SELECT SUM(l.amount_cents) FROM cost_lines l WHERE l.job_id = j.id), 0)
             + COALESCE((SELECT SUM(t.cost_cents) FROM time_entries t WHERE t.job_id = j.id), 0)
             + COALESCE((SELECT SUM(r.cost_cents) FROM rentals r WHERE r.job_id = j.id), 0) AS cost,
           (SELECT b.total_length_ft FROM bids b WHERE b.job_id = j.id AND b.status = 'accepted') AS ft
         FROM jobs j WHERE j.organization_id = ? AND j.status IN ('completed', 'closed')
          AND COALESCE(j.completed_date, j.start_date, j.decided_date) BETWEEN ? AND ?) x
       JOIN fence_styles s ON s.id = x.style WHERE x.ft > 0 GROUP BY s.name HAVING COUNT(*) >= 2`, [dash.id, year.from, year.to]);
    const ranked = (styles as { name: string; gp: string; ft: string }[])
      .map((s) => ({ name: s.name, perFt: Math.round(Number(s.gp) / Number(s.ft)) }))
      .sort((a, b) => b.perFt - a.perFt || a.name.localeCompare(b.name));
    expect(ranked).toHaveLength(2);
    expect(tile(html, 'best-style')).toBe(ranked[0].name);
    expect(tile(html, 'worst-style')).toBe(ranked[1].name);
    expect(html).toContain(`${formatMoney(ranked[0].perFt)}/ft`);

    // The margins screen over the same twelve months names the same best and worst, by the same rule.
    const margins = await dash.owner.get(`/margins?from=${year.from}&to=${year.to}`);
    expect(margins.status).toBe(200);
    expect(tile(margins.text, 'best-style')).toBe(ranked[0].name);
    expect(tile(margins.text, 'worst-style')).toBe(ranked[1].name);
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
