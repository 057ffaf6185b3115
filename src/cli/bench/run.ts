/**
 * `npm run bench`: benchmarks side by side with their raw baselines, in one run on this
 * machine, so the ratios hold on a noisy machine. Writes reports/bench.md and bench.json.
 * Runs under the stack runner (throwaway database, free ports); see src/cli/stack.ts.
 */
import http from 'node:http';
import { readdirSync, readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import knexFactory, { type Knex } from 'knex';
import Papa from 'papaparse';
import { knexConfig } from '../../server/db-config.ts';
import { LARGE, seedLargeCompany } from '../../server/seed/large.ts';
import { load, type LoadResult } from './load.ts';
import { emptyIslandBaseline, pageWeights } from './pages.ts';
import { coldAndWarmStart } from './start-times.ts';
import { jobFiguresQuery } from '../../server/repos/reports.ts';

interface Stack { root: string; appUrl: string; databaseUrl: string; outDir: string; pids: { app: number } }
const stack = JSON.parse(readFileSync(process.env.TALLYPOST_STACK!, 'utf8')) as Stack;
const args = new Set(process.argv.slice(2));
const quick = args.has('--quick');
const SIZE = { jobs: quick ? 500 : 5000, costLines: quick ? 100_000 : 1_000_000, importLines: quick ? 10_000 : 100_000 };
const PASSWORD = 'bench-password-123';
const report: Record<string, unknown> = { startedAt: new Date().toISOString(), machine: { cpus: os.cpus().length, cpu: os.cpus()[0]?.model, memGiB: Math.round(os.totalmem() / 2 ** 30), node: process.version }, size: SIZE };
const log = (s: string) => console.log(`[bench] ${s}`);
const secs = (t0: number) => (performance.now() - t0) / 1000;
const round = (x: number, d = 2) => Math.round(x * 10 ** d) / 10 ** d;

async function signIn(email: string, password: string): Promise<string> {
  const r = await fetch(`${stack.appUrl}/api/auth/sign-in/email`, { method: 'POST', headers: { 'content-type': 'application/json', origin: stack.appUrl }, body: JSON.stringify({ email, password }) });
  if (r.status !== 200) throw new Error(`sign-in failed: ${r.status} ${await r.text()}`);
  return r.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
}

/** Peak resident memory (VmHWM) of the app: the largest of its process and the processes it forked. */
function peakRssMb(pid: number): number {
  const peak = (p: number) => Number(/VmHWM:\s+(\d+)/.exec(readFileSync(`/proc/${p}/status`, 'utf8'))?.[1] ?? 0);
  const children = readdirSync('/proc').filter((d) => /^\d+$/.test(d)).map(Number).filter((p) => {
    try { return Number(readFileSync(`/proc/${p}/stat`, 'utf8').split(') ')[1].split(' ')[1]) === pid; } catch { return false; }
  });
  return round(Math.max(peak(pid), ...children.map(peak)) / 1024, 1);
}

async function timed<T>(fn: () => Promise<T>): Promise<{ s: number; value: T }> {
  const t0 = performance.now();
  const value = await fn();
  return { s: secs(t0), value };
}

/** The median of n runs of fn, in seconds, after two unmeasured runs (JIT, buffer pool). */
async function medianOf(n: number, fn: () => Promise<unknown>): Promise<number> {
  for (let i = 0; i < 2; i++) await fn();
  const xs: number[] = [];
  for (let i = 0; i < n; i++) xs.push((await timed(fn)).s);
  xs.sort((a, b) => a - b);
  return xs[Math.floor(xs.length / 2)];
}

function receiptCsv(jobCodes: string[], lines: number): string {
  const out = ['Date,Invoice #,Line,SKU,Description,Qty,Unit Price,Ext,PO'];
  for (let i = 0; i < lines; i++) {
    const qty = 1 + (i % 12);
    const price = 100 + ((i * 37) % 5000);
    out.push(`3/${1 + (i % 28)}/2026,BENCH-${Math.floor(i / 20)},${(i % 20) + 1},SKU-${i % 700},"Bench item ${i % 700}, treated",${qty},$${(price / 100).toFixed(2)},$${((qty * price) / 100).toFixed(2)},${jobCodes[i % jobCodes.length]}`);
  }
  return out.join('\r\n');
}

async function importBenchmark(k: Knex, cookie: string): Promise<Record<string, unknown>> {
  const codes = (await k('jobs').where('organization_id', LARGE.orgId).whereNot('status', 'lost').limit(300).pluck('code')) as string[];
  const csv = receiptCsv(codes, SIZE.importLines);
  log(`receipt import: ${SIZE.importLines} lines, ${round(csv.length / 2 ** 20, 1)} MB`);
  const t0 = performance.now();
  const form = new FormData();
  form.set('supplier', 'Bench Supply House');
  form.set('file', new Blob([csv], { type: 'text/csv' }), 'bench.csv');
  const up = await fetch(`${stack.appUrl}/api/receipts/imports`, { method: 'POST', headers: { cookie, origin: stack.appUrl }, body: form });
  const preview = (await up.json()) as { id: number; counts: { lines: number; errors: number } };
  if (up.status !== 201) throw new Error(`upload failed: ${up.status} ${JSON.stringify(preview).slice(0, 300)}`);
  const previewS = secs(t0);
  const c = await fetch(`${stack.appUrl}/api/receipts/imports/${preview.id}/commit`, { method: 'POST', headers: { cookie, origin: stack.appUrl, 'content-type': 'application/json' }, body: '{}' });
  const committed = (await c.json()) as { summary?: { added: number } };
  if (c.status !== 200) throw new Error(`commit failed: ${c.status} ${JSON.stringify(committed).slice(0, 300)}`);
  const appS = secs(t0);
  const peak = peakRssMb(stack.pids.app);

  // Baseline: papaparse over the same text, then a Knex batch insert of the same rows into
  // the same table the commit fills.
  const b0 = performance.now();
  const parsed = Papa.parse<string[]>(csv, { skipEmptyLines: true });
  const jobIds = new Map((await k('jobs').where('organization_id', LARGE.orgId).whereIn('code', codes).select('id', 'code')).map((j) => [j.code, Number(j.id)]));
  const rows = parsed.data.slice(1).map((r) => ({
    organization_id: LARGE.orgId, source: 'manual', job_id: jobIds.get(r[8]) ?? null, category: 'material', cost_date: '2026-03-01',
    description: r[4], sku: r[3], quantity: Number(r[5]), unit: 'EA', amount_cents: Math.round(Number(r[7].replace(/[$,]/g, '')) * 100), created_by: 'bench-baseline',
  }));
  await k.batchInsert('cost_lines', rows, 2000);
  const baseS = secs(b0);
  await k('cost_lines').where({ organization_id: LARGE.orgId, created_by: 'bench-baseline' }).delete();
  return {
    lines: SIZE.importLines, previewS: round(previewS), appS: round(appS), baselineS: round(baseS), ratio: round(appS / baseS), target: 1.5,
    added: committed.summary?.added, errors: preview.counts.errors, peakRssMb: peak, peakTargetMb: 400,
  };
}

async function jobsPageVsBare(cookie: string): Promise<Record<string, unknown>> {
  const path0 = '/api/jobs?page=2&pageSize=50&sort=code&dir=desc';
  const body = await (await fetch(`${stack.appUrl}${path0}`, { headers: { cookie } })).text();
  const bare = http.createServer((_req, res) => {
    res.writeHead(200, { 'content-type': 'application/json; charset=utf-8' });
    res.end(body);
  });
  await new Promise<void>((r) => bare.listen(0, '127.0.0.1', () => r()));
  const port = (bare.address() as { port: number }).port;
  const durationS = quick ? 5 : 15;
  const app = await load({ url: stack.appUrl, paths: [path0], connections: 20, durationS, cookie });
  const raw = await load({ url: `http://127.0.0.1:${port}`, paths: [path0], connections: 20, durationS });
  bare.close();
  return { path: path0, bytes: body.length, app, bare: raw, p50Ratio: round(app.p50 / Math.max(raw.p50, 0.01)) };
}

async function mixedLoad(k: Knex, cookie: string): Promise<{ paths: string[]; result: LoadResult }> {
  const jobs = (await k('jobs').where('organization_id', LARGE.orgId).whereNot('status', 'lost').orderBy('id', 'desc').limit(200).pluck('id')) as number[];
  const paths: string[] = [];
  for (let i = 0; i < 40; i++) {
    paths.push(`/api/jobs?page=${1 + (i % 20)}&pageSize=50&sort=${['code', 'customer', 'leadDate'][i % 3]}&dir=desc`);
    paths.push(`/api/jobs/${jobs[i % jobs.length]}/costing`);
    if (i % 4 === 0) paths.push('/api/receivables');
    if (i % 4 === 2) paths.push(MARGIN_PATH);
  }
  const ok = await fetch(`${stack.appUrl}${MARGIN_PATH}`, { headers: { cookie } });
  const usable = ok.status === 200 ? paths : paths.filter((p) => p !== MARGIN_PATH);
  // Ten seconds of the same load first, unmeasured: the JIT and MariaDB's buffer pool warm up
  // as they would on a server that has been running.
  await load({ url: stack.appUrl, paths: usable, connections: 50, durationS: quick ? 3 : 10, cookie });
  const result = await load({ url: stack.appUrl, paths: usable, connections: 50, durationS: quick ? 10 : 60, cookie });
  return { paths: [...new Set(usable.map((p) => p.replace(/\d+/g, 'N')))], result };
}

const MARGIN_PATH = '/api/reports/margin-by-style';

async function marginBenchmark(k: Knex, cookie: string): Promise<Record<string, unknown>> {
  const probe = await fetch(`${stack.appUrl}${MARGIN_PATH}`, { headers: { cookie } });
  if (probe.status !== 200) return { available: false, status: probe.status };
  // The report's own statement, with the endpoint's default filter (finished jobs).
  const q = jobFiguresQuery(k, LARGE.orgId, { status: ['completed', 'closed'] });
  const sql = q.toSQL().toNative();
  const n = quick ? 3 : 5;
  // Computed (the report cache told to recompute), against the same statement run directly.
  const apiS = await medianOf(n, async () => (await fetch(`${stack.appUrl}${MARGIN_PATH}`, { headers: { cookie, 'cache-control': 'no-cache' } })).arrayBuffer());
  const sqlS = await medianOf(n, () => k.raw(sql.sql, sql.bindings as never[]));
  // Served from the report cache, as every read after the first is while nothing changes.
  const cachedS = await medianOf(n, async () => (await fetch(`${stack.appUrl}${MARGIN_PATH}`, { headers: { cookie } })).arrayBuffer());
  // What job_cost_totals saves: the same per-job cost sums taken from all the cost lines.
  const rawSumsS = await medianOf(n, () => k.raw(
    `SELECT u.job_id, u.category, SUM(u.cents) FROM (
       SELECT job_id, category, amount_cents AS cents FROM cost_lines WHERE organization_id = ? AND job_id IS NOT NULL
       UNION ALL SELECT job_id, 'labour', cost_cents FROM time_entries WHERE organization_id = ?
       UNION ALL SELECT job_id, 'rental', cost_cents FROM rentals WHERE organization_id = ? AND cost_cents IS NOT NULL) u
     GROUP BY u.job_id, u.category`, [LARGE.orgId, LARGE.orgId, LARGE.orgId]));
  const totalsS = await medianOf(n, () => k.raw('SELECT job_id, category, amount_cents FROM job_cost_totals WHERE organization_id = ?', [LARGE.orgId]));
  const [explain] = await k.raw(`EXPLAIN ${sql.sql}`, sql.bindings as never[]);
  return {
    available: true, runs: n, apiS: round(apiS, 3), sqlS: round(sqlS, 3), ratio: round(apiS / sqlS), target: 1.3, cachedS: round(cachedS, 4),
    rawSumsS: round(rawSumsS, 3), totalsS: round(totalsS, 4), sql: sql.sql, explain,
  };
}

function md(r: Record<string, any>): string {
  const L: string[] = [];
  L.push('# Tallypost benchmarks', '', `One run of \`npm run bench\` on ${r.machine.cpus} cores (${r.machine.cpu}), ${r.machine.memGiB} GiB, Node ${r.machine.node}, ${r.startedAt}. Every figure is measured beside its raw baseline in the same run.`, '');
  L.push(`Data set: one company with ${r.seed.jobs} jobs over ten years and ${r.seed.costLines + r.seed.timeEntries + r.seed.rentals} cost lines (${r.seed.costLines} receipt lines, ${r.seed.timeEntries} crew-hour entries, ${r.seed.rentals} rentals), generated by \`src/server/seed/large.ts\` in ${r.seed.s} s.`, '');
  L.push('| benchmark | Tallypost | raw baseline | ratio | target |', '| --- | --- | --- | --- | --- |');
  const imp = r.import;
  L.push(`| receipt import, ${imp.lines} lines, preview + commit end to end | ${imp.appS} s (preview ${imp.previewS} s) | papaparse + Knex batch insert: ${imp.baselineS} s | ${imp.ratio} | ≤ ${imp.target} |`);
  if (r.margin.available) {
    L.push(`| margin by style over all cost lines, through the API, computed (median of ${r.margin.runs}) | ${r.margin.apiS} s | same SQL run directly: ${r.margin.sqlS} s | ${r.margin.ratio} | ≤ ${r.margin.target} |`);
    L.push(`| margin by style, through the API, from the report cache | ${r.margin.cachedS} s | the computed report above: ${r.margin.apiS} s | ${round(r.margin.cachedS / r.margin.apiS, 3)} | report |`);
    L.push(`| each job's cost by category: from job_cost_totals | ${r.margin.totalsS} s | summed from every cost line, crew hour and rental: ${r.margin.rawSumsS} s | ${round(r.margin.totalsS / r.margin.rawSumsS, 3)} | report |`);
  }
  else L.push(`| margin by style | not available (GET ${MARGIN_PATH} answered ${r.margin.status}) | | | |`);
  L.push(`| GET /api/jobs, page of 50, 20 connections, p50 latency | ${r.jobs.app.p50} ms | bare Node http, same JSON from memory: ${r.jobs.bare.p50} ms | ${r.jobs.p50Ratio} | report |`);
  const heaviest = Math.max(...r.pages.map((p: any) => p.gzipBytes));
  for (const p of r.pages) L.push(`| JavaScript shipped, ${p.page} (\`${p.path}\`), gzip | ${round(p.gzipBytes / 1024, 1)} KB in ${p.scripts} scripts | one empty React island: ${round(r.emptyIsland.gzipBytes / 1024, 1)} KB | ${round(p.gzipBytes / r.emptyIsland.gzipBytes)} | heaviest ≤ 250 KB${p.gzipBytes === heaviest ? ' (this one)' : ''} |`);
  L.push(`| \`npm start\` to healthy, cold (fresh data and build folders) | ${round(r.start.coldS, 1)} s | | | report |`);
  L.push(`| \`npm start\` to healthy, warm | ${round(r.start.warmS, 1)} s | | | ≤ 20 s |`);
  L.push('', `Peak memory (VmHWM) of the app process after the import: ${imp.peakRssMb} MB (target ≤ ${imp.peakTargetMb} MB). Lines added by the commit: ${imp.added}; rows refused: ${imp.errors}.`, '');
  L.push(
    'What the import does that its baseline does not: the upload streams the file into MariaDB (it is kept); the preview normalises every row (money, dates, units), keys it and checks the key against every line ever imported, matches it to a job, and writes it with its raw cells to `import_lines`, where the bookkeeper reviews, fixes and allocates; the commit marks the lines already imported, copies the rest into `cost_lines` with one INSERT … SELECT (whose triggers keep `job_cost_totals`) and marks them committed under their unique key. The baseline parses once and inserts once, into the same table with the same triggers. The staging table is the price of the review step and of the de-duplication, and it is why this ratio stays above its target.',
    '',
  );
  const l = r.load.result;
  L.push('## Load', '', `autocannon on loopback, 50 connections for ${l.durationS} s after 10 s of unmeasured warm-up, signed in as the owner, cycling over: ${r.load.paths.map((p: string) => `\`${p}\``).join(', ')}. The load generator runs on the same two cores as the app and MariaDB.`, '');
  L.push('| requests | req/s | p50 | p95 | p99 | errors | non-2xx | 5xx |', '| --- | --- | --- | --- | --- | --- | --- | --- |');
  L.push(`| ${l.requests} | ${l.rps} | ${l.p50} ms | ${l.p95} ms | ${l.p99} ms | ${l.errors} | ${l.non2xx} | ${l.status5xx} |`, '');
  L.push(`Targets: 0 errors and 0 5xx, p99 under 250 ms on this machine.`, '');
  if (r.margin.available) {
    L.push('## The margin-by-style query and its plan', '', '```sql', r.margin.sql, '```', '', '| id | select_type | table | type | key | rows | Extra |', '| --- | --- | --- | --- | --- | --- | --- |');
    for (const e of r.margin.explain as any[]) L.push(`| ${e.id} | ${e.select_type} | ${e.table} | ${e.type} | ${e.key ?? ''} | ${e.rows} | ${e.Extra ?? ''} |`);
    L.push('');
  }
  L.push('Ratios are Tallypost ÷ baseline; lower is better. Re-run with `npm run bench` (or `npm run bench -- --quick` for a small data set).');
  return L.join('\n') + '\n';
}

async function main(): Promise<void> {
  const k = knexFactory(knexConfig(stack.databaseUrl, { min: 0, max: 4 }));
  try {
    log(`seeding ${SIZE.jobs} jobs and ${SIZE.costLines} cost lines ...`);
    let last = 0;
    const seeded = await timed(() => seedLargeCompany(k, { jobs: SIZE.jobs, costLines: SIZE.costLines, password: PASSWORD, onProgress: (_w, d, t) => { if (d - last >= t / 10) { last = d; log(`  ${d} / ${t}`); } } }));
    report.seed = { ...seeded.value, s: round(seeded.s, 1) };
    await k.raw('ANALYZE TABLE cost_lines, time_entries, rentals, jobs, job_estimates, invoices');
    const cookie = await signIn(LARGE.ownerEmail, PASSWORD);
    log('receipt import against its baseline ...');
    report.import = await importBenchmark(k, cookie);
    log('margin by style against its SQL ...');
    report.margin = await marginBenchmark(k, cookie);
    log('jobs page against a bare handler ...');
    report.jobs = await jobsPageVsBare(cookie);
    log('mixed load, 50 connections ...');
    report.load = await mixedLoad(k, cookie);
    log('JavaScript per page ...');
    const job = (await k('jobs').where('organization_id', LARGE.orgId).orderBy('id', 'desc').first('id')) as { id: number };
    report.pages = await pageWeights(stack.appUrl, cookie, [
      { page: 'dashboard', path: '/' },
      { page: 'jobs table', path: '/jobs' },
      { page: 'bid builder', path: `/jobs/${job.id}/bids/new` },
      { page: 'receipt upload', path: '/receipts' },
    ]);
    report.emptyIsland = emptyIslandBaseline(stack.outDir);
    log('cold and warm npm start ...');
    report.start = await coldAndWarmStart(stack.root);
  } finally {
    await k.destroy();
  }
  const dir = path.join(stack.root, 'reports');
  mkdirSync(dir, { recursive: true });
  writeFileSync(path.join(dir, 'bench.json'), JSON.stringify(report, null, 2));
  writeFileSync(path.join(dir, 'bench.md'), md(report));
  log(`wrote reports/bench.md and reports/bench.json`);
  console.log(md(report));
}

main().catch((e) => {
  console.error('[bench]', e);
  process.exit(1);
});
