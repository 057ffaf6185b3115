import Papa from 'papaparse';
import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { CSV_COLUMNS, parsePriceBookRows, priceBookCsvRows, type PriceBookQuery, type PriceItemInput } from '../../lib/pricing/pricebook.ts';
import * as repo from '../repos/pricebook.ts';
import { audit } from '../repos/audit.ts';

/** A change is news to the estimator unless the estimator made it. */
const seenBy = (actor: Actor) => actor.role === 'estimator';

export const listItems = (actor: Actor, query: PriceBookQuery) => repo.listItems(actor.companyId, query).then((r) => ({ ...r, page: query.page, pageSize: query.pageSize }));

export async function getItem(actor: Actor, id: number) {
  const it = await repo.findItem(actor.companyId, id);
  if (!it) throw notFound('That price-book item');
  return it;
}

function duplicateSku(sku: string) {
  return new AppError('CONFLICT', `Item code ${sku} is already in the price book.`, { sku: `${sku} is already used.` });
}

export async function createItem(actor: Actor, input: PriceItemInput) {
  if (await repo.findBySku(actor.companyId, input.sku)) throw duplicateSku(input.sku);
  const id = await db().transaction(async (trx) => {
    const newId = await repo.insertItem(actor.companyId, input, trx);
    const sup = await repo.supplierId(actor.companyId, input.supplierName, trx);
    await repo.recordChange(actor.companyId, { itemId: newId, oldCents: null, newCents: input.unitCostCents, supplierId: sup, source: 'manual', userId: actor.userId, seen: seenBy(actor) }, trx);
    await audit(trx, actor, 'price_book_item', newId, 'create', { sku: input.sku });
    return newId;
  });
  return getItem(actor, id);
}

export async function updateItem(actor: Actor, id: number, input: Partial<PriceItemInput>) {
  const before = await getItem(actor, id);
  if (input.sku && input.sku !== before.sku && (await repo.findBySku(actor.companyId, input.sku))) throw duplicateSku(input.sku);
  await db().transaction(async (trx) => {
    await repo.updateItem(actor.companyId, id, input, trx);
    if (input.unitCostCents !== undefined && input.unitCostCents !== before.unitCostCents) {
      const sup = await repo.supplierId(actor.companyId, input.supplierName === undefined ? before.supplierName : input.supplierName, trx);
      await repo.recordChange(actor.companyId, { itemId: id, oldCents: before.unitCostCents, newCents: input.unitCostCents, supplierId: sup, source: 'manual', userId: actor.userId, seen: seenBy(actor) }, trx);
    }
    await audit(trx, actor, 'price_book_item', id, 'update', { fields: Object.keys(input) });
  });
  return getItem(actor, id);
}

export async function deleteItem(actor: Actor, id: number): Promise<void> {
  await getItem(actor, id);
  await db().transaction(async (trx) => {
    await trx('price_book_items').where({ organization_id: actor.companyId, id }).delete();
    await audit(trx, actor, 'price_book_item', id, 'delete');
  });
}

/**
 * Imports a price-book CSV: rows are matched by item code, new codes are added, changed
 * unit costs are recorded as price changes. All rows or none: any bad row is a 400 with
 * the line and column. dryRun answers the counts without saving.
 */
export async function importCsv(actor: Actor, csv: string, dryRun: boolean, fileName: string | null) {
  const parsed = Papa.parse<Record<string, string>>(csv.replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: 'greedy', transformHeader: (h) => h.trim().toLowerCase().replace(/\s+/g, '_') });
  const headers = parsed.meta.fields ?? [];
  const missing = ['sku', 'name', 'unit', 'unit_cost'].filter((h) => !headers.includes(h));
  if (missing.length) throw new AppError('BAD_INPUT', `The CSV needs the columns ${CSV_COLUMNS.join(', ')}; missing: ${missing.join(', ')}.`, { csv: `Missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}.` });
  if (parsed.data.length > 5000) throw new AppError('BAD_INPUT', 'At most 5000 rows in one import.', { csv: 'At most 5000 rows.' });
  const { items, fields } = parsePriceBookRows(parsed.data);
  if (Object.keys(fields).length) throw new AppError('BAD_INPUT', `${Object.keys(fields).length} line(s) need attention; nothing was imported.`, fields);

  const run = async (trx: import('knex').Knex.Transaction) => {
    let created = 0, updated = 0, unchanged = 0, priceChanges = 0;
    for (const it of items) {
      const existing = await repo.findBySku(actor.companyId, it.sku, trx);
      if (!existing) {
        const id = await repo.insertItem(actor.companyId, it, trx);
        await repo.recordChange(actor.companyId, { itemId: id, oldCents: null, newCents: it.unitCostCents, supplierId: await repo.supplierId(actor.companyId, it.supplierName, trx), source: 'csv_import', sourceRef: fileName ?? undefined, userId: actor.userId, seen: seenBy(actor) }, trx);
        created++;
        continue;
      }
      const same = existing.name === it.name && existing.category === it.category && existing.unit === it.unit && existing.unitCostCents === it.unitCostCents
        && existing.supplierName === it.supplierName && existing.lastSeenOn === it.lastSeenOn && existing.active === it.active && existing.notes === it.notes;
      if (same) { unchanged++; continue; }
      await repo.updateItem(actor.companyId, existing.id, it, trx);
      if (existing.unitCostCents !== it.unitCostCents) {
        await repo.recordChange(actor.companyId, { itemId: existing.id, oldCents: existing.unitCostCents, newCents: it.unitCostCents, supplierId: await repo.supplierId(actor.companyId, it.supplierName, trx), source: 'csv_import', sourceRef: fileName ?? undefined, userId: actor.userId, seen: seenBy(actor) }, trx);
        priceChanges++;
      }
      updated++;
    }
    return { rows: items.length, created, updated, unchanged, priceChanges };
  };
  if (dryRun) {
    // The same work inside a transaction that is rolled back, so the counts are exact.
    const trx = await db().transaction();
    try { return { ...(await run(trx)), dryRun: true }; } finally { await trx.rollback(); }
  }
  return db().transaction(async (trx) => {
    const result = await run(trx);
    await audit(trx, actor, 'price_book', actor.companyId, 'import', { ...result, fileName });
    return { ...result, dryRun: false };
  });
}

export async function exportCsv(actor: Actor): Promise<string> {
  return Papa.unparse(priceBookCsvRows(await repo.allItems(actor.companyId)), { newline: '\r\n' });
}

export const unseenChanges = (actor: Actor) => repo.unseenChanges(actor.companyId).then((items) => ({ items }));

export async function markSeen(actor: Actor, ids: number[] | 'all') {
  return { marked: await repo.markSeen(actor.companyId, ids) };
}

export const listSuppliers = (actor: Actor) => repo.listSuppliers(actor.companyId).then((items) => ({ items }));
