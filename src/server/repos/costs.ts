import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { CostListQuery, CostRow, CostTotals } from '../../lib/costs/schema.ts';
import type { CostCategory } from '../../lib/costs/categories.ts';
import { TIME_TASK_LABELS, type TimeTask } from '../../lib/labour/tasks.ts';
import { EQUIPMENT_LABELS, type EquipmentKind } from '../../lib/rentals/rates.ts';

type Q = Knex | Knex.Transaction;

/**
 * Every actual cost of the company as one set of rows: receipt and hand-entered cost lines,
 * crew hours at their burdened cost, and priced rentals. Each branch is scoped to the company.
 */
export function allCosts(q: Q, companyId: string) {
  const lines = q('cost_lines as c')
    .leftJoin('import_lines as il', function () { this.on('il.id', 'c.import_line_id').andOn('il.organization_id', 'c.organization_id'); })
    .where('c.organization_id', companyId)
    .select(
      'c.source as kind', 'c.id', 'c.cost_date as date', 'c.job_id', 'c.overhead', 'c.category', 'c.supplier_id', 'c.description',
      'c.quantity', 'c.unit', 'c.amount_cents', 'il.import_id', 'il.row_number', 'c.import_line_id',
    );
  const time = q('time_entries as t')
    .join('workers as w', function () { this.on('w.id', 't.worker_id').andOn('w.organization_id', 't.organization_id'); })
    .where('t.organization_id', companyId)
    .select(
      q.raw("'time' as kind"), 't.id', 't.work_date as date', 't.job_id', q.raw('0 as overhead'), q.raw("'labour' as category"), q.raw('NULL as supplier_id'),
      q.raw("CONCAT(w.name, ' · ', t.task) as description"), 't.hours as quantity', q.raw("'hr' as unit"), 't.cost_cents as amount_cents',
      q.raw('NULL as import_id'), q.raw('NULL as `row_number`'), q.raw('NULL as import_line_id'),
    );
  const rentals = q('rentals as r')
    .where('r.organization_id', companyId)
    .whereNotNull('r.cost_cents')
    .select(
      q.raw("'rental' as kind"), 'r.id', q.raw('DATE(r.start_at) as date'), 'r.job_id', q.raw('0 as overhead'), q.raw("'rental' as category"), 'r.supplier_id',
      q.raw("CONCAT(r.kind, IF(r.description IS NULL, '', CONCAT(' · ', r.description))) as description"),
      q.raw('(r.weeks * 7 + r.days + r.half_days / 2) as quantity'), q.raw("'day' as unit"), 'r.cost_cents as amount_cents',
      q.raw('NULL as import_id'), q.raw('NULL as `row_number`'), q.raw('NULL as import_line_id'),
    );
  return lines.unionAll([time, rentals], true);
}

const SORTS: Record<CostListQuery['sort'], string> = {
  date: 'u.date',
  job: 'j.code',
  category: 'u.category',
  supplier: 's.name',
  amount: 'u.amount_cents',
  description: 'u.description',
  kind: 'u.kind',
};

function filtered(q: Q, companyId: string, f: CostListQuery) {
  const b = q
    .from(allCosts(q, companyId).as('u'))
    .leftJoin('jobs as j', function () { this.on('j.id', 'u.job_id').andOn('j.organization_id', q.raw('?', [companyId])); })
    .leftJoin('suppliers as s', function () { this.on('s.id', 'u.supplier_id').andOn('s.organization_id', q.raw('?', [companyId])); });
  if (f.job.length) b.whereIn('u.job_id', f.job);
  if (f.category.length) b.whereIn('u.category', f.category);
  if (f.supplier.length) b.whereIn('u.supplier_id', f.supplier);
  if (f.kind.length) b.whereIn('u.kind', f.kind);
  if (f.from) b.andWhere('u.date', '>=', f.from);
  if (f.to) b.andWhere('u.date', '<=', f.to);
  if (f.unmatched) b.whereNull('u.job_id').andWhere('u.overhead', 0).andWhere('u.kind', 'receipt');
  if (f.overhead) b.andWhere('u.overhead', 1);
  if (f.q) {
    const like = `%${f.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    b.andWhere((w) => w.whereILike('u.description', like).orWhereILike('j.code', like).orWhereILike('s.name', like));
  }
  return b;
}

/** Task and equipment keys in the union's descriptions, in words. */
function describe(kind: string, text: string | null): string | null {
  if (!text) return text;
  if (kind === 'time') return text.replace(/ · (\w+)$/, (_, t: string) => ` · ${TIME_TASK_LABELS[t as TimeTask] ?? t}`);
  if (kind === 'rental') return text.replace(/^(\w+)/, (k: string) => EQUIPMENT_LABELS[k as EquipmentKind] ?? k);
  return text;
}

function fromRow(r: Record<string, unknown>): CostRow {
  return {
    kind: r.kind as CostRow['kind'],
    id: Number(r.id),
    date: r.date instanceof Date ? r.date.toISOString().slice(0, 10) : String(r.date).slice(0, 10),
    jobId: r.job_id == null ? null : Number(r.job_id),
    jobCode: (r.job_code as string) ?? null,
    overhead: Boolean(Number(r.overhead)),
    category: r.category as CostCategory,
    supplierId: r.supplier_id == null ? null : Number(r.supplier_id),
    supplierName: (r.supplier_name as string) ?? null,
    description: describe(r.kind as string, (r.description as string) ?? null),
    quantity: r.quantity == null ? null : String(Number(r.quantity)),
    unit: (r.unit as string) ?? null,
    amountCents: toInt(r.amount_cents),
    importId: r.import_id == null ? null : Number(r.import_id),
    rowNumber: r.row_number == null ? null : Number(r.row_number),
    importLineId: r.import_line_id == null ? null : Number(r.import_line_id),
  };
}

const FIELDS = ['u.*', 'j.code as job_code', 's.name as supplier_name'];

export async function listCosts(companyId: string, f: CostListQuery, q: Q = db()): Promise<{ items: CostRow[]; total: number; totals: CostTotals }> {
  const base = filtered(q, companyId, f);
  const byCat = (await base.clone().clearSelect().groupBy('u.category').select('u.category', q.raw('COUNT(*) AS n'), q.raw('COALESCE(SUM(u.amount_cents), 0) AS cents'))) as { category: CostCategory; n: number; cents: string }[];
  const totals: CostTotals = { count: 0, amountCents: 0, byCategory: {} };
  for (const r of byCat) {
    totals.count += Number(r.n);
    totals.amountCents += toInt(r.cents);
    totals.byCategory[r.category] = toInt(r.cents);
  }
  const rows = await base
    .clone()
    .select(FIELDS)
    .orderBy(SORTS[f.sort], f.dir)
    .orderBy('u.kind')
    .orderBy('u.id', f.dir)
    .limit(f.pageSize)
    .offset((f.page - 1) * f.pageSize);
  return { items: rows.map(fromRow), total: totals.count, totals };
}

/** All filtered rows in pages, for exports that never hold the whole set. */
export async function* eachCost(companyId: string, f: CostListQuery, q: Q = db()): AsyncGenerator<CostRow[]> {
  for (let offset = 0; ; offset += 2000) {
    const rows = await filtered(q, companyId, f).select(FIELDS).orderBy(SORTS[f.sort], f.dir).orderBy('u.kind').orderBy('u.id', f.dir).limit(2000).offset(offset);
    if (!rows.length) return;
    yield rows.map(fromRow);
    if (rows.length < 2000) return;
  }
}

/** A job's actual cost by category, from every source. */
export interface JobCostingFigures {
  estimates: { category: CostCategory; amountCents: number; source: string }[];
  actuals: { category: CostCategory; amountCents: number }[];
  approvedChangeOrdersCents: number;
  hoursByTask: { task: string; hours: number }[];
  unpricedRentals: number;
  costFlagPct: number | null;
}

/**
 * What one job's costing needs besides the job itself, in one statement: the estimate by
 * category and source, the actual cost by category (job_cost_totals, the sums of cost lines,
 * crew hours and priced rentals), approved change orders, crew hours by task, rentals still
 * without rates, and the company's cost flag percent.
 */
export async function jobCostingFigures(companyId: string, jobId: number, q: Q = db()): Promise<JobCostingFigures> {
  const [rows] = (await q.raw(
    `SELECT 'estimate' AS kind, category AS k, source AS k2, SUM(amount_cents) AS v FROM job_estimates WHERE organization_id = ? AND job_id = ? GROUP BY category, source
     UNION ALL SELECT 'actual', category, NULL, amount_cents FROM job_cost_totals WHERE organization_id = ? AND job_id = ?
     UNION ALL SELECT 'co', NULL, NULL, COALESCE(SUM(price_cents), 0) FROM change_orders WHERE organization_id = ? AND job_id = ? AND status = 'approved'
     UNION ALL SELECT 'hours', task, NULL, SUM(hours) FROM time_entries WHERE organization_id = ? AND job_id = ? GROUP BY task
     UNION ALL SELECT 'unpriced', NULL, NULL, COUNT(*) FROM rentals WHERE organization_id = ? AND job_id = ? AND cost_cents IS NULL
     UNION ALL SELECT 'flag', NULL, NULL, cost_flag_pct FROM company_settings WHERE organization_id = ?`,
    [companyId, jobId, companyId, jobId, companyId, jobId, companyId, jobId, companyId, jobId, companyId],
  )) as unknown as [{ kind: string; k: string | null; k2: string | null; v: string | number | null }[]];
  const out: JobCostingFigures = { estimates: [], actuals: [], approvedChangeOrdersCents: 0, hoursByTask: [], unpricedRentals: 0, costFlagPct: null };
  for (const r of rows) {
    if (r.kind === 'estimate') out.estimates.push({ category: r.k as CostCategory, amountCents: toInt(r.v), source: String(r.k2) });
    else if (r.kind === 'actual') out.actuals.push({ category: r.k as CostCategory, amountCents: toInt(r.v) });
    else if (r.kind === 'co') out.approvedChangeOrdersCents = toInt(r.v);
    else if (r.kind === 'hours') out.hoursByTask.push({ task: String(r.k), hours: Number(r.v) });
    else if (r.kind === 'unpriced') out.unpricedRentals = Number(r.v);
    else if (r.kind === 'flag') out.costFlagPct = r.v === null ? null : Number(r.v);
  }
  return out;
}

export async function insertCostLines(rows: Record<string, unknown>[], q: Q): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) await q('cost_lines').insert(rows.slice(i, i + 500));
}

export async function findManualCost(companyId: string, id: number, q: Q = db()) {
  return q('cost_lines').where({ organization_id: companyId, id, source: 'manual' }).first();
}
