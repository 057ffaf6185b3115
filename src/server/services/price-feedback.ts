import type { Knex } from 'knex';
import type { Actor } from '../http.ts';

export interface PriceSighting {
  lineId: number;
  importId: number;
  itemId: number;
  /** cents per unit, as the receipt priced it */
  unitCostCents: number;
  supplierId: number | null;
  /** the receipt's date */
  date: string;
}

/**
 * Receipt lines tell the price book what an item costs now: each sighting sets the item's
 * unit cost, supplier and last-seen date, oldest first so the newest receipt wins, and an
 * older receipt never overwrites a newer price. A change the estimator has not seen is
 * recorded with the line it came from. Returns how many items changed price or supplier.
 */
export async function applyPriceFeedback(trx: Knex.Transaction, actor: Actor, sightings: PriceSighting[]): Promise<number> {
  if (!sightings.length) return 0;
  const ordered = [...sightings].sort((a, b) => a.date.localeCompare(b.date) || a.lineId - b.lineId);
  const ids = [...new Set(ordered.map((s) => s.itemId))];
  const items = new Map<number, { cost: number | null; supplier: number | null; seen: string | null }>();
  for (const r of await trx('price_book_items').where('organization_id', actor.companyId).whereIn('id', ids).forUpdate().select('id', 'unit_cost_cents', 'supplier_id', 'last_seen_on')) {
    items.set(Number(r.id), { cost: r.unit_cost_cents == null ? null : Number(r.unit_cost_cents), supplier: r.supplier_id == null ? null : Number(r.supplier_id), seen: r.last_seen_on ?? null });
  }
  const refs = ordered.map((s) => ref(s));
  const already = new Set((await trx('price_book_changes').where({ organization_id: actor.companyId, source: 'receipt' }).whereIn('source_ref', refs).select('source_ref')).map((r) => r.source_ref));
  const changes: Record<string, unknown>[] = [];
  const touched = new Set<number>();
  for (const s of ordered) {
    const item = items.get(s.itemId);
    if (!item || already.has(ref(s))) continue;
    if (item.seen && s.date < item.seen) continue;
    if (item.cost !== s.unitCostCents || item.supplier !== s.supplierId) {
      changes.push({
        organization_id: actor.companyId,
        item_id: s.itemId,
        old_unit_cost_cents: item.cost,
        new_unit_cost_cents: s.unitCostCents,
        supplier_id: s.supplierId,
        source: 'receipt',
        source_ref: ref(s),
        changed_by: actor.userId || null,
        seen_by_estimator: false,
      });
    }
    item.cost = s.unitCostCents;
    item.supplier = s.supplierId;
    item.seen = s.date;
    touched.add(s.itemId);
  }
  for (const id of touched) {
    const it = items.get(id)!;
    await trx('price_book_items').where({ organization_id: actor.companyId, id }).update({ unit_cost_cents: it.cost, supplier_id: it.supplier, last_seen_on: it.seen, updated_at: trx.fn.now(3) });
  }
  for (let i = 0; i < changes.length; i += 500) await trx('price_book_changes').insert(changes.slice(i, i + 500));
  return changes.length;
}

function ref(s: PriceSighting): string {
  return `import:${s.importId}/line:${s.lineId}`;
}
