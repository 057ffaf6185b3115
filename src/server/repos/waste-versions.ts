import type { Knex } from 'knex';
import { db } from '../db.ts';
import { WASTE_KEYS, type WasteKey } from '../../lib/takeoff/recipe.ts';

type Q = Knex | Knex.Transaction;

export interface WasteVersion {
  id: number;
  wasteKey: WasteKey;
  versionNo: number;
  /** percent over the takeoff; null when the value before was never recorded */
  oldPct: number | null;
  newPct: number;
  reason: string;
  createdBy: string | null;
  createdByName: string | null;
  createdAt: string;
}

/**
 * Records each waste percent that changed between two recipes of a style, with the value
 * before, who and why. Call it in the transaction that writes the recipe, holding the
 * style's row lock (so version numbers and "before" values cannot interleave).
 */
export async function addWasteVersions(
  companyId: string, styleId: number, before: Partial<Record<WasteKey, number>> | null, after: Partial<Record<WasteKey, number>>,
  reason: string, userId: string | null, trx: Knex.Transaction,
): Promise<number> {
  let written = 0;
  for (const key of WASTE_KEYS) {
    const next = after[key];
    const prev = before?.[key];
    if (next === undefined || prev === next) continue;
    const last = await trx('waste_versions').where({ organization_id: companyId, style_id: styleId, waste_key: key }).max({ n: 'version_no' }).first();
    await trx('waste_versions').insert({
      organization_id: companyId, style_id: styleId, waste_key: key, version_no: Number(last?.n ?? 0) + 1, old_pct: prev ?? null, new_pct: next, reason, created_by: userId,
    });
    written++;
  }
  return written;
}

/** Every waste change of a style, newest first. */
export async function wasteHistory(companyId: string, styleId: number, q: Q = db()): Promise<WasteVersion[]> {
  const rows = await q('waste_versions as w')
    .leftJoin('user as u', 'u.id', 'w.created_by')
    .where({ 'w.organization_id': companyId, 'w.style_id': styleId })
    .orderBy([{ column: 'w.created_at', order: 'desc' }, { column: 'w.id', order: 'desc' }])
    .select('w.id', 'w.waste_key', 'w.version_no', 'w.old_pct', 'w.new_pct', 'w.reason', 'w.created_by', 'u.name as created_by_name', 'w.created_at');
  return rows.map((r) => ({
    id: Number(r.id), wasteKey: r.waste_key, versionNo: Number(r.version_no), oldPct: r.old_pct === null ? null : Number(r.old_pct), newPct: Number(r.new_pct), reason: r.reason,
    createdBy: r.created_by ?? null, createdByName: r.created_by_name ?? null, createdAt: new Date(r.created_at).toISOString(),
  }));
}
