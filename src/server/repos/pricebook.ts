import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { PriceBookItem, PriceBookQuery, PriceItemInput } from '../../lib/pricing/pricebook.ts';
import type { PriceItem } from '../../lib/pricing/price.ts';

type Q = Knex | Knex.Transaction;

const SORT: Record<PriceBookQuery['sort'], string> = {
  sku: 'i.sku', name: 'i.name', category: 'i.category', unit: 'i.unit', unitCost: 'i.unit_cost_cents', supplier: 's.name', lastSeen: 'i.last_seen_on',
};

function fromRow(r: Record<string, unknown>): PriceBookItem {
  return {
    id: Number(r.id), sku: r.sku as string, name: r.name as string, category: r.category as PriceBookItem['category'], unit: r.unit as string,
    unitCostCents: Number(r.unit_cost_cents), supplierId: r.supplier_id == null ? null : Number(r.supplier_id), supplierName: (r.supplier_name as string) ?? null,
    lastSeenOn: (r.last_seen_on as string) ?? null, active: Boolean(r.active), notes: (r.notes as string) ?? null, updatedAt: new Date(r.updated_at as string).toISOString(),
  };
}

function base(q: Q, companyId: string) {
  return q('price_book_items as i')
    .leftJoin('suppliers as s', function () {
      this.on('s.id', 'i.supplier_id').andOn('s.organization_id', 'i.organization_id');
    })
    .where('i.organization_id', companyId);
}
const FIELDS = ['i.*', 's.name as supplier_name'];

export async function listItems(companyId: string, query: PriceBookQuery, q: Q = db()): Promise<{ items: PriceBookItem[]; total: number }> {
  const b = base(q, companyId);
  if (query.category) b.andWhere('i.category', query.category);
  if (query.active !== 'all') b.andWhere('i.active', query.active === 'active');
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    b.andWhere((w) => w.whereILike('i.sku', like).orWhereILike('i.name', like).orWhereILike('s.name', like));
  }
  const [{ n }] = await b.clone().clearSelect().count({ n: '*' });
  const rows = await b.clone().select(FIELDS).orderBy(SORT[query.sort], query.dir).orderBy('i.id', query.dir).limit(query.pageSize).offset((query.page - 1) * query.pageSize);
  return { items: rows.map(fromRow), total: Number(n) };
}

export async function allItems(companyId: string, q: Q = db()): Promise<PriceBookItem[]> {
  return (await base(q, companyId).select(FIELDS).orderBy('i.sku')).map(fromRow);
}

export async function findItem(companyId: string, id: number, q: Q = db()): Promise<PriceBookItem | undefined> {
  const r = await base(q, companyId).andWhere('i.id', id).first(FIELDS);
  return r ? fromRow(r) : undefined;
}

export async function findBySku(companyId: string, sku: string, q: Q = db()): Promise<PriceBookItem | undefined> {
  const r = await base(q, companyId).andWhere('i.sku', sku).first(FIELDS);
  return r ? fromRow(r) : undefined;
}

/** Active items by sku, as pricing reads them. */
export async function priceMap(companyId: string, q: Q = db()): Promise<Map<string, PriceItem>> {
  const rows = await base(q, companyId).andWhere('i.active', true).select(FIELDS);
  return new Map(rows.map(fromRow).map((it) => [it.sku, { itemId: it.id, sku: it.sku, name: it.name, unit: it.unit, category: it.category, unitCostCents: it.unitCostCents, supplierName: it.supplierName, lastSeenOn: it.lastSeenOn }]));
}

/** The supplier's id by name, made when missing (suppliers are unique by name in a company). */
export async function supplierId(companyId: string, name: string | null, q: Q): Promise<number | null> {
  if (!name) return null;
  const found = await q('suppliers').where({ organization_id: companyId, name }).first('id');
  if (found) return Number(found.id);
  await q('suppliers').insert({ organization_id: companyId, name }).onConflict(['organization_id', 'name']).ignore();
  const again = await q('suppliers').where({ organization_id: companyId, name }).first('id');
  return Number(again.id);
}

export async function listSuppliers(companyId: string, q: Q = db()): Promise<{ id: number; name: string }[]> {
  return (await q('suppliers').where('organization_id', companyId).orderBy('name').select('id', 'name')).map((r) => ({ id: Number(r.id), name: r.name }));
}

function toRow(input: Partial<PriceItemInput>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  const map: Record<string, string> = { sku: 'sku', name: 'name', category: 'category', unit: 'unit', unitCostCents: 'unit_cost_cents', lastSeenOn: 'last_seen_on', active: 'active', notes: 'notes' };
  for (const [k, col] of Object.entries(map)) if (k in input) row[col] = (input as Record<string, unknown>)[k];
  return row;
}

export async function insertItem(companyId: string, input: PriceItemInput, trx: Knex.Transaction): Promise<number> {
  const [id] = await trx('price_book_items').insert({ organization_id: companyId, ...toRow(input), supplier_id: await supplierId(companyId, input.supplierName, trx) });
  return Number(id);
}

export async function updateItem(companyId: string, id: number, input: Partial<PriceItemInput>, trx: Knex.Transaction): Promise<void> {
  const row = toRow(input);
  if ('supplierName' in input) row.supplier_id = await supplierId(companyId, input.supplierName ?? null, trx);
  await trx('price_book_items').where({ organization_id: companyId, id }).update({ ...row, updated_at: trx.fn.now(3) });
}

export async function recordChange(companyId: string, c: { itemId: number; oldCents: number | null; newCents: number; supplierId: number | null; source: 'manual' | 'csv_import'; sourceRef?: string; userId: string; seen: boolean }, trx: Knex.Transaction): Promise<void> {
  await trx('price_book_changes').insert({
    organization_id: companyId, item_id: c.itemId, old_unit_cost_cents: c.oldCents, new_unit_cost_cents: c.newCents, supplier_id: c.supplierId,
    source: c.source, source_ref: c.sourceRef ?? null, changed_by: c.userId, seen_by_estimator: c.seen,
  });
}

export interface PriceChange {
  id: number;
  itemId: number;
  sku: string;
  name: string;
  unit: string;
  oldUnitCostCents: number | null;
  newUnitCostCents: number;
  supplierName: string | null;
  source: string;
  sourceRef: string | null;
  changedByName: string | null;
  createdAt: string;
}

/** Price changes the estimator has not looked at yet, newest first. */
export async function unseenChanges(companyId: string, q: Q = db()): Promise<PriceChange[]> {
  const rows = await q('price_book_changes as c')
    .join('price_book_items as i', function () {
      this.on('i.id', 'c.item_id').andOn('i.organization_id', 'c.organization_id');
    })
    .leftJoin('suppliers as s', function () {
      this.on('s.id', 'c.supplier_id').andOn('s.organization_id', 'c.organization_id');
    })
    .leftJoin('user as u', 'u.id', 'c.changed_by')
    .where({ 'c.organization_id': companyId, 'c.seen_by_estimator': false })
    .orderBy([{ column: 'c.created_at', order: 'desc' }, { column: 'c.id', order: 'desc' }])
    .limit(200)
    .select('c.id', 'c.item_id', 'i.sku', 'i.name', 'i.unit', 'c.old_unit_cost_cents', 'c.new_unit_cost_cents', 's.name as supplier_name', 'c.source', 'c.source_ref', 'u.name as changed_by_name', 'c.created_at');
  return rows.map((r) => ({
    id: Number(r.id), itemId: Number(r.item_id), sku: r.sku, name: r.name, unit: r.unit, oldUnitCostCents: r.old_unit_cost_cents == null ? null : Number(r.old_unit_cost_cents),
    newUnitCostCents: Number(r.new_unit_cost_cents), supplierName: r.supplier_name ?? null, source: r.source, sourceRef: r.source_ref ?? null,
    changedByName: r.changed_by_name ?? null, createdAt: new Date(r.created_at).toISOString(),
  }));
}

export async function markSeen(companyId: string, ids: number[] | 'all', q: Q = db()): Promise<number> {
  const b = q('price_book_changes').where({ organization_id: companyId, seen_by_estimator: false });
  if (ids !== 'all') b.whereIn('id', ids);
  return b.update({ seen_by_estimator: true });
}
