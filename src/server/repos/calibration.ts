import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import { DIG_EQUIPMENT, type FinishedJob } from '../../lib/calibration/calibrate.ts';
import type { UnitCostRow } from '../../lib/calibration/unit-costs.ts';
import type { LabourTask } from '../../lib/takeoff/rates.ts';
import type { RateKind } from '../../lib/takeoff/rates.ts';
import type { WasteKey } from '../../lib/takeoff/recipe.ts';
import { FINISHED_STATUSES } from '../../lib/margins/job.ts';
import { jobFigures } from './reports.ts';

type Q = Knex | Knex.Transaction;

/** How crews log the bid's labour tasks. */
const TIME_TASK_OF: Record<LabourTask, string> = { posts: 'dig_set_posts', rails_infill: 'rails_infill', gates: 'gates', setup: 'cleanup' };

const parse = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;

/**
 * The company's finished jobs with an accepted bid, with what each bid allowed and what each
 * job took: hours by task, materials by waste group at the bid's unit costs, rental days,
 * and cost by group. Also the unit costs paid against the bids' (for the price-book check).
 */
export async function finishedJobs(companyId: string, q: Q = db()): Promise<{ jobs: FinishedJob[]; unitCosts: UnitCostRow[] }> {
  const base = await q('jobs as j')
    .join('bids as b', function () { this.on('b.job_id', 'j.id').andOn('b.organization_id', 'j.organization_id'); })
    .join('fence_styles as s', function () { this.on('s.id', 'b.style_id').andOn('s.organization_id', 'b.organization_id'); })
    .where({ 'j.organization_id': companyId, 'b.status': 'accepted' })
    .whereIn('j.status', FINISHED_STATUSES as string[])
    .orderBy('j.code')
    .select('j.id', 'j.code', 'j.title', 'b.style_id', 's.name as style_name', q.raw('COALESCE(j.completed_date, j.closed_date, j.start_date, j.decided_date) AS completed_on'),
      'b.id as bid_id', 'b.crew_size', 'b.hole_count', 'b.fence_ft', 'b.gate_count', 'b.rental_days', 'b.takeoff');
  if (!base.length) return { jobs: [], unitCosts: [] };
  const jobIds = base.map((r) => Number(r.id));
  const bidIds = base.map((r) => Number(r.bid_id));
  const org = { organization_id: companyId };
  const [figures, labour, snaps, labourCost, hours, lines, bought, rentals, rentalLines] = await Promise.all([
    jobFigures(companyId, { status: FINISHED_STATUSES }, q),
    q('bid_labour').where(org).whereIn('bid_id', bidIds).select('bid_id', 'task', 'crew_hours', 'man_hours'),
    q('bid_rate_snapshots').where(org).whereIn('bid_id', bidIds).select('bid_id', 'kind', 'value'),
    q('bid_lines').where({ ...org, kind: 'labour' }).whereIn('bid_id', bidIds).groupBy('bid_id').select('bid_id', q.raw('SUM(amount_cents) AS cents')),
    q('time_entries').where(org).whereIn('job_id', jobIds).groupBy('job_id', 'task').select('job_id', 'task', q.raw('SUM(hours) AS hours')),
    q('bid_lines').where({ ...org, kind: 'material' }).whereIn('bid_id', bidIds).select('bid_id', 'sku', 'description', 'takeoff_qty', 'buy_qty', 'waste_pct', 'unit_cost_cents'),
    q('cost_lines').where(org).whereIn('job_id', jobIds).whereNotNull('sku').groupBy('job_id', 'sku')
      .select('job_id', 'sku', q.raw('SUM(quantity) AS qty'), q.raw('SUM(CASE WHEN quantity > 0 THEN quantity ELSE 0 END) AS paid_qty'), q.raw('SUM(CASE WHEN quantity > 0 THEN amount_cents ELSE 0 END) AS paid_cents')),
    q('rentals').where(org).whereIn('job_id', jobIds).groupBy('job_id')
      .select('job_id', q.raw('SUM(weeks * 7 + days + half_days / 2) AS days'), q.raw(`SUM(CASE WHEN kind IN (${DIG_EQUIPMENT.map(() => '?').join(',')}) THEN weeks * 7 + days + half_days / 2 ELSE 0 END) AS dig_days`, [...DIG_EQUIPMENT])),
    q('bid_lines').where({ ...org, kind: 'rental' }).whereIn('bid_id', bidIds).groupBy('bid_id').select('bid_id', q.raw('SUM(amount_cents) AS cents')),
  ]);
  const fig = new Map(figures.map((f) => [f.jobId, f]));
  const boughtBy = new Map(bought.map((b) => [`${b.job_id} ${b.sku}`, b]));
  // Each job's rows by id, once, rather than a scan of every row per job.
  const groupBy = <T>(rows: T[], key: (r: T) => string | number) => {
    const m = new Map<string | number, T[]>();
    for (const r of rows) { const k = key(r); const list = m.get(k); if (list) list.push(r); else m.set(k, [r]); }
    return m;
  };
  const labourBy = groupBy(labour, (l) => Number(l.bid_id));
  const snapsBy = groupBy(snaps, (x) => Number(x.bid_id));
  const linesBy = groupBy(lines, (l) => Number(l.bid_id));
  const labourCostBy = new Map(labourCost.map((c) => [Number(c.bid_id), toInt(c.cents)]));
  const rentalCostBy = new Map(rentalLines.map((c) => [Number(c.bid_id), toInt(c.cents)]));
  const hoursBy = new Map(hours.map((h) => [`${Number(h.job_id)} ${h.task}`, Number(h.hours)]));
  const rentalsBy = new Map(rentals.map((x) => [Number(x.job_id), x]));
  const unitCosts: UnitCostRow[] = [];
  const jobs = base.map((r): FinishedJob => {
    const jobId = Number(r.id);
    const bidId = Number(r.bid_id);
    const f = fig.get(jobId);
    const taskRows = labourBy.get(bidId) ?? [];
    const crewHours = taskRows.reduce((a, l) => a + Number(l.crew_hours), 0);
    const cost = labourCostBy.get(bidId) ?? 0;
    const logged = (task: string) => hoursBy.get(`${jobId} ${task}`) ?? 0;
    const takeoff = parse<{ materials?: { sku: string; group: string }[]; rentals?: { coversHours: number; days: number; halfDaySku: string | null }[] }>(r.takeoff);
    const groupOf = new Map((takeoff.materials ?? []).map((m) => [m.sku, m.group]));
    const digRules = takeoff.rentals ?? [];
    const rented = rentalsBy.get(jobId);
    const materials: FinishedJob['materials'] = {};
    for (const l of linesBy.get(bidId) ?? []) {
      const group = (groupOf.get(l.sku) ?? 'hardware') as WasteKey;
      const unit = toInt(l.unit_cost_cents);
      const b = boughtBy.get(`${jobId} ${l.sku}`);
      const m = (materials[group] ??= { wastePct: Number(l.waste_pct ?? 0), takeoffCents: 0, buyCents: 0, boughtCents: 0 });
      m.takeoffCents += Number(l.takeoff_qty ?? 0) * unit;
      m.buyCents += Number(l.buy_qty ?? 0) * unit;
      m.boughtCents += Number(b?.qty ?? 0) * unit;
      if (b && Number(b.paid_qty) > 0 && unit > 0) unitCosts.push({ sku: l.sku, name: l.description, jobId, bidUnitCostCents: unit, paidQty: Number(b.paid_qty), paidCents: toInt(b.paid_cents) });
    }
    return {
      jobId, code: String(r.code), title: String(r.title), styleId: Number(r.style_id), styleName: String(r.style_name), completedOn: String(r.completed_on),
      estimatedCostCents: f ? Object.values(f.estimated).reduce((a, v) => a + v, 0) : 0,
      actualCostCents: f ? Object.values(f.actual).reduce((a, v) => a + v, 0) : 0,
      estimated: f?.estimated ?? { material: 0, labour: 0, rental: 0, other: 0 },
      actual: f?.actual ?? { material: 0, labour: 0, rental: 0, other: 0 },
      crewSize: Number(r.crew_size), crewHourCostCents: crewHours > 0 ? cost / crewHours : 0,
      holes: Number(r.hole_count), fenceFt: Number(r.fence_ft), gates: Number(r.gate_count),
      bidRates: Object.fromEntries((snapsBy.get(bidId) ?? []).map((s) => [s.kind as RateKind, Number(s.value)])),
      labour: Object.fromEntries(taskRows.map((l) => [l.task, { bidManHours: Number(l.man_hours), actualManHours: logged(TIME_TASK_OF[l.task as LabourTask] ?? l.task) }])),
      materials,
      rentalDays: { bid: Number(r.rental_days), actual: Number(rented?.days ?? 0) },
      digRental: digRules.length ? {
        bidDigHours: Number(digRules[0].coversHours), rules: digRules.length, halfDays: Boolean(digRules[0].halfDaySku), bidDaysPerRule: Number(digRules[0].days),
        bidCostCents: rentalCostBy.get(bidId) ?? 0, actualDays: Number(rented?.dig_days ?? 0),
      } : null,
    };
  });
  return { jobs, unitCosts };
}

export interface Exclusion {
  id: number;
  jobId: number;
  jobCode: string;
  scope: string;
  reason: string;
  createdByName: string | null;
  createdAt: string;
}

export async function listExclusions(companyId: string, q: Q = db()): Promise<Exclusion[]> {
  const rows = await q('calibration_exclusions as x')
    .join('jobs as j', function () { this.on('j.id', 'x.job_id').andOn('j.organization_id', 'x.organization_id'); })
    .leftJoin('user as u', 'u.id', 'x.created_by')
    .where('x.organization_id', companyId)
    .orderBy('x.created_at', 'desc')
    .select('x.id', 'x.job_id', 'j.code', 'x.scope', 'x.reason', 'u.name as created_by_name', 'x.created_at');
  return rows.map((r) => ({ id: Number(r.id), jobId: Number(r.job_id), jobCode: r.code, scope: r.scope, reason: r.reason, createdByName: r.created_by_name ?? null, createdAt: new Date(r.created_at).toISOString() }));
}

export async function insertExclusion(companyId: string, e: { jobId: number; scope: string; reason: string; createdBy: string }, q: Q = db()): Promise<number> {
  const [id] = await q('calibration_exclusions').insert({ organization_id: companyId, job_id: e.jobId, scope: e.scope, reason: e.reason, created_by: e.createdBy });
  return Number(id);
}

export async function deleteExclusion(companyId: string, id: number, q: Q = db()): Promise<number> {
  return q('calibration_exclusions').where({ organization_id: companyId, id }).delete();
}

export async function findExclusion(companyId: string, id: number, q: Q = db()) {
  return q('calibration_exclusions').where({ organization_id: companyId, id }).first();
}

export interface Application {
  id: number;
  styleId: number;
  styleName: string;
  itemKey: string;
  oldValues: Record<string, number>;
  newValues: Record<string, number>;
  jobs: number;
  mapeBefore: number;
  mapeAfter: number;
  biasBefore: number;
  biasAfter: number;
  reason: string;
  createdByName: string | null;
  createdAt: string;
}

export async function insertApplication(companyId: string, a: Omit<Application, 'id' | 'styleName' | 'createdByName' | 'createdAt'> & { createdBy: string }, trx: Knex.Transaction): Promise<void> {
  await trx('calibration_applications').insert({
    organization_id: companyId, style_id: a.styleId, item_key: a.itemKey, old_values: JSON.stringify(a.oldValues), new_values: JSON.stringify(a.newValues), jobs: a.jobs,
    mape_before: a.mapeBefore, mape_after: a.mapeAfter, bias_before: a.biasBefore, bias_after: a.biasAfter, reason: a.reason, created_by: a.createdBy,
  });
}

export async function listApplications(companyId: string, q: Q = db()): Promise<Application[]> {
  const rows = await q('calibration_applications as a')
    .join('fence_styles as s', function () { this.on('s.id', 'a.style_id').andOn('s.organization_id', 'a.organization_id'); })
    .leftJoin('user as u', 'u.id', 'a.created_by')
    .where('a.organization_id', companyId)
    .orderBy([{ column: 'a.created_at', order: 'desc' }, { column: 'a.id', order: 'desc' }])
    .limit(200)
    .select('a.*', 's.name as style_name', 'u.name as created_by_name');
  return rows.map((r) => ({
    id: Number(r.id), styleId: Number(r.style_id), styleName: r.style_name, itemKey: r.item_key, oldValues: parse(r.old_values), newValues: parse(r.new_values), jobs: Number(r.jobs),
    mapeBefore: Number(r.mape_before), mapeAfter: Number(r.mape_after), biasBefore: Number(r.bias_before), biasAfter: Number(r.bias_after), reason: r.reason,
    createdByName: r.created_by_name ?? null, createdAt: new Date(r.created_at).toISOString(),
  }));
}
