import type { Knex } from 'knex';
import { db } from '../db.ts';
import { RATE_KINDS, type RateKind, type Rates } from '../../lib/takeoff/rates.ts';

type Q = Knex | Knex.Transaction;

export interface RateVersion {
  id: number;
  kind: RateKind;
  versionNo: number;
  value: number;
  reason: string;
  createdBy: string | null;
  createdByName: string | null;
  createdAt: string;
}

/** The current value of each rate of a style and the version it comes from. */
export async function currentRates(companyId: string, styleId: number, q: Q = db()): Promise<{ values: Partial<Rates>; versionIds: Partial<Record<RateKind, number>> }> {
  const rows = await q('labour_rates as r')
    .join('labour_rate_versions as v', function () {
      this.on('v.rate_id', 'r.id').andOn('v.organization_id', 'r.organization_id');
    })
    .where({ 'r.organization_id': companyId, 'r.style_id': styleId })
    .whereRaw('v.version_no = (SELECT MAX(v2.version_no) FROM labour_rate_versions v2 WHERE v2.rate_id = r.id)')
    .select('r.kind', 'v.id', 'v.value');
  const values: Partial<Rates> = {};
  const versionIds: Partial<Record<RateKind, number>> = {};
  for (const r of rows) {
    values[r.kind as RateKind] = Number(r.value);
    versionIds[r.kind as RateKind] = Number(r.id);
  }
  return { values, versionIds };
}

/** Every version of every rate of a style, newest first. */
export async function rateHistory(companyId: string, styleId: number, q: Q = db()): Promise<RateVersion[]> {
  const rows = await q('labour_rates as r')
    .join('labour_rate_versions as v', function () {
      this.on('v.rate_id', 'r.id').andOn('v.organization_id', 'r.organization_id');
    })
    .leftJoin('user as u', 'u.id', 'v.created_by')
    .where({ 'r.organization_id': companyId, 'r.style_id': styleId })
    .orderBy([{ column: 'v.created_at', order: 'desc' }, { column: 'v.id', order: 'desc' }])
    .select('v.id', 'r.kind', 'v.version_no', 'v.value', 'v.reason', 'v.created_by', 'u.name as created_by_name', 'v.created_at');
  return rows.map((r) => ({
    id: Number(r.id), kind: r.kind, versionNo: Number(r.version_no), value: Number(r.value), reason: r.reason,
    createdBy: r.created_by ?? null, createdByName: r.created_by_name ?? null, createdAt: new Date(r.created_at).toISOString(),
  }));
}

/**
 * Writes a new version for each rate whose value changed (or has none yet), with who and
 * why. Earlier versions stay; bids keep the values they were priced with.
 */
export async function addRateVersions(companyId: string, styleId: number, values: Partial<Rates>, reason: string, userId: string | null, trx: Knex.Transaction, at?: Date): Promise<number> {
  const current = await currentRates(companyId, styleId, trx);
  let written = 0;
  for (const kind of RATE_KINDS) {
    const value = values[kind];
    if (value === undefined || current.values[kind] === value) continue;
    // Insert-or-ignore rather than SELECT … FOR UPDATE: locking a row that is not there takes
    // a gap lock, and two companies signing up at once would deadlock on it.
    await trx('labour_rates').insert({ organization_id: companyId, style_id: styleId, kind }).onConflict(['organization_id', 'style_id', 'kind']).ignore();
    const rate = await trx('labour_rates').where({ organization_id: companyId, style_id: styleId, kind }).first('id');
    const last = await trx('labour_rate_versions').where({ organization_id: companyId, rate_id: rate.id }).max({ n: 'version_no' }).first();
    await trx('labour_rate_versions').insert({
      organization_id: companyId, rate_id: rate.id, version_no: Number(last?.n ?? 0) + 1, value, reason, created_by: userId, ...(at ? { created_at: at } : {}),
    });
    written++;
  }
  return written;
}
