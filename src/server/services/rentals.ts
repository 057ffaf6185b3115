import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { rentalCost, EQUIPMENT_KINDS, type EquipmentKind } from '../../lib/rentals/rates.ts';
import type { RateCardInput, RateCardRow, Rental, RentalInput, RentalListQuery } from '../../lib/rentals/schema.ts';
import * as rentals from '../repos/rentals.ts';
import { findSupplier } from '../repos/suppliers.ts';
import { audit } from '../repos/audit.ts';
import { scopeFor } from './jobs.ts';
import { seesMoney, workingJob } from './time.ts';

function redact(actor: Actor, r: Rental): Rental {
  if (seesMoney(actor)) return r;
  const { halfDayCents: _h, dayCents: _d, weekCents: _w, deliveryCents: _del, fuelCents: _f, plan: _p, costCents: _c, ...rest } = r;
  return rest;
}

export async function listRentals(actor: Actor, query: RentalListQuery) {
  const r = await rentals.listRentals(actor.companyId, query, scopeFor(actor));
  return { items: r.items.map((x) => redact(actor, x)), total: r.total, ...(seesMoney(actor) ? { costCents: r.costCents } : {}) };
}

async function rateFor(actor: Actor, kind: EquipmentKind): Promise<RateCardRow | undefined> {
  return (await rentals.rateCard(actor.companyId)).find((r) => r.kind === kind);
}

/**
 * The rental's row: its rates (typed from the ticket, or the company's rate card when none
 * are given, and always the rate card for a crew lead, who never handles money) and the
 * cheapest periods that cover the time.
 */
async function priced(actor: Actor, input: RentalInput): Promise<Record<string, unknown>> {
  const money = seesMoney(actor);
  let rates = { halfDayCents: money ? input.halfDayCents : null, dayCents: money ? input.dayCents : null, weekCents: money ? input.weekCents : null };
  if (rates.halfDayCents === null && rates.dayCents === null && rates.weekCents === null) {
    const card = await rateFor(actor, input.kind);
    if (card) rates = { halfDayCents: card.halfDayCents, dayCents: card.dayCents, weekCents: card.weekCents };
  }
  const deliveryCents = money ? input.deliveryCents ?? 0 : 0;
  const fuelCents = money ? input.fuelCents ?? 0 : 0;
  const cost = rentalCost({ startAt: input.startAt, endAt: input.endAt, rates, deliveryCents, fuelCents });
  if (!cost.ok && !/at least one rate/.test(cost.reason)) throw new AppError('BAD_INPUT', `The rental cannot be priced: ${cost.reason}.`, { endAt: cost.reason });
  return {
    job_id: input.jobId,
    kind: input.kind,
    description: input.description,
    supplier_id: input.supplierId,
    start_at: input.startAt.replace('T', ' '),
    end_at: input.endAt.replace('T', ' '),
    half_day_cents: rates.halfDayCents,
    day_cents: rates.dayCents,
    week_cents: rates.weekCents,
    delivery_cents: deliveryCents,
    fuel_cents: fuelCents,
    weeks: cost.ok ? cost.plan.weeks : 0,
    days: cost.ok ? cost.plan.days : 0,
    half_days: cost.ok ? cost.plan.halfDays : 0,
    // No rates anywhere: logged now, priced when the bookkeeper adds them.
    cost_cents: cost.ok ? cost.totalCents : null,
    notes: input.notes,
  };
}

async function checkSupplier(actor: Actor, id: number | null) {
  if (id !== null && !(await findSupplier(actor.companyId, id))) throw new AppError('BAD_INPUT', 'Choose a supplier of this company.', { supplierId: 'Choose a supplier from the list.' });
}

export async function createRental(actor: Actor, input: RentalInput): Promise<Rental> {
  await workingJob(actor, input.jobId);
  await checkSupplier(actor, input.supplierId);
  const row = await priced(actor, input);
  const id = await db().transaction(async (trx) => {
    const newId = await rentals.insertRental(actor.companyId, { ...row, entered_by: actor.userId }, trx);
    await audit(trx, actor, 'rental', newId, 'create', { jobId: input.jobId, kind: input.kind });
    return newId;
  });
  return getRental(actor, id);
}

export async function getRental(actor: Actor, id: number): Promise<Rental> {
  const r = await rentals.findRental(actor.companyId, id, scopeFor(actor));
  if (!r) throw notFound('That rental');
  return redact(actor, r);
}

export async function updateRental(actor: Actor, id: number, input: RentalInput): Promise<Rental> {
  const existing = await getRental(actor, id);
  if (input.jobId !== existing.jobId) await workingJob(actor, input.jobId);
  await checkSupplier(actor, input.supplierId);
  const row = await priced(actor, input);
  await db().transaction(async (trx) => {
    await rentals.updateRental(actor.companyId, id, row, trx);
    await audit(trx, actor, 'rental', id, 'update', { kind: input.kind });
  });
  return getRental(actor, id);
}

export async function deleteRental(actor: Actor, id: number): Promise<void> {
  await getRental(actor, id);
  await db().transaction(async (trx) => {
    await rentals.deleteRental(actor.companyId, id, trx);
    await audit(trx, actor, 'rental', id, 'delete');
  });
}

export async function getRateCard(actor: Actor): Promise<RateCardRow[]> {
  const saved = await rentals.rateCard(actor.companyId);
  return EQUIPMENT_KINDS.map((kind) => saved.find((r) => r.kind === kind) ?? { kind, halfDayCents: null, dayCents: null, weekCents: null });
}

export async function saveRateCard(actor: Actor, input: RateCardInput): Promise<RateCardRow[]> {
  await db().transaction(async (trx) => {
    await rentals.saveRateCard(actor.companyId, input.rates, trx);
    await audit(trx, actor, 'rate_card', actor.companyId, 'update', { kinds: input.rates.map((r) => r.kind) });
  });
  return getRateCard(actor);
}
