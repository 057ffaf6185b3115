import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { RateCardRow, Rental, RentalListQuery } from '../../lib/rentals/schema.ts';
import { rentalHours, type EquipmentKind } from '../../lib/rentals/rates.ts';
import type { TimeScope } from './time-entries.ts';

type Q = Knex | Knex.Transaction;

const nullableInt = (v: unknown) => (v === null || v === undefined ? null : toInt(v));

/** DATETIME comes back as a Date read as UTC; the wall-clock text is what was stored. */
export function wallClock(v: unknown): string {
  if (v instanceof Date) return v.toISOString().slice(0, 16);
  return String(v).replace(' ', 'T').slice(0, 16);
}

function fromRow(r: Record<string, unknown>): Rental {
  const startAt = wallClock(r.start_at);
  const endAt = wallClock(r.end_at);
  const priced = r.cost_cents !== null && r.cost_cents !== undefined;
  return {
    id: Number(r.id),
    jobId: Number(r.job_id),
    jobCode: r.job_code as string,
    kind: r.kind as EquipmentKind,
    description: (r.description as string) ?? null,
    supplierId: r.supplier_id == null ? null : Number(r.supplier_id),
    supplierName: (r.supplier_name as string) ?? null,
    startAt,
    endAt,
    hours: rentalHours(startAt, endAt) ?? 0,
    notes: (r.notes as string) ?? null,
    halfDayCents: nullableInt(r.half_day_cents),
    dayCents: nullableInt(r.day_cents),
    weekCents: nullableInt(r.week_cents),
    deliveryCents: toInt(r.delivery_cents),
    fuelCents: toInt(r.fuel_cents),
    plan: priced ? { weeks: Number(r.weeks), days: Number(r.days), halfDays: Number(r.half_days), rentCents: toInt(r.cost_cents) - toInt(r.delivery_cents) - toInt(r.fuel_cents) } : null,
    costCents: priced ? toInt(r.cost_cents) : null,
  };
}

function base(q: Q, companyId: string, scope: TimeScope) {
  const b = q('rentals as r')
    .join('jobs as j', function () { this.on('j.id', 'r.job_id').andOn('j.organization_id', 'r.organization_id'); })
    .leftJoin('suppliers as s', function () { this.on('s.id', 'r.supplier_id').andOn('s.organization_id', 'r.organization_id'); })
    .where('r.organization_id', companyId);
  if (scope.crewLeadUserId) b.andWhere('j.crew_lead_user_id', scope.crewLeadUserId);
  return b;
}

const FIELDS = ['r.*', 'j.code as job_code', 's.name as supplier_name'];

export async function listRentals(companyId: string, query: RentalListQuery, scope: TimeScope = {}, q: Q = db()) {
  const b = base(q, companyId, scope);
  if (query.job.length) b.whereIn('r.job_id', query.job);
  if (query.from) b.andWhere('r.end_at', '>=', `${query.from} 00:00:00`);
  if (query.to) b.andWhere('r.start_at', '<=', `${query.to} 23:59:59`);
  const [agg] = await b.clone().select(q.raw('COUNT(*) AS n, COALESCE(SUM(r.cost_cents), 0) AS cost'));
  const rows = await b.clone().select(FIELDS).orderBy([{ column: 'r.start_at', order: 'desc' }, { column: 'r.id', order: 'desc' }]).limit(query.pageSize).offset((query.page - 1) * query.pageSize);
  return { items: rows.map(fromRow), total: Number(agg.n), costCents: toInt(agg.cost) };
}

export async function findRental(companyId: string, id: number, scope: TimeScope = {}, q: Q = db()): Promise<Rental | undefined> {
  const r = await base(q, companyId, scope).andWhere('r.id', id).first(FIELDS);
  return r ? fromRow(r) : undefined;
}

export async function insertRental(companyId: string, row: Record<string, unknown>, q: Q): Promise<number> {
  const [id] = await q('rentals').insert({ organization_id: companyId, ...row });
  return Number(id);
}

export async function updateRental(companyId: string, id: number, row: Record<string, unknown>, q: Q): Promise<void> {
  await q('rentals').where({ organization_id: companyId, id }).update({ ...row, updated_at: q.fn.now(3) });
}

export async function deleteRental(companyId: string, id: number, q: Q = db()): Promise<boolean> {
  return (await q('rentals').where({ organization_id: companyId, id }).delete()) > 0;
}

export async function rateCard(companyId: string, q: Q = db()): Promise<RateCardRow[]> {
  const rows = await q('equipment_rates').where('organization_id', companyId).orderBy('kind');
  return rows.map((r) => ({ kind: r.kind, halfDayCents: nullableInt(r.half_day_cents), dayCents: nullableInt(r.day_cents), weekCents: nullableInt(r.week_cents) }));
}

export async function saveRateCard(companyId: string, rows: RateCardRow[], q: Q): Promise<void> {
  for (const r of rows) {
    await q('equipment_rates')
      .insert({ organization_id: companyId, kind: r.kind, half_day_cents: r.halfDayCents, day_cents: r.dayCents, week_cents: r.weekCents })
      .onConflict(['organization_id', 'kind'])
      .merge(['half_day_cents', 'day_cents', 'week_cents', 'updated_at']);
  }
}
