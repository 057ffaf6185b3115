import type { Knex } from 'knex';
import { db } from '../db.ts';

type Q = Knex | Knex.Transaction;

export interface SupplierOption {
  id: number;
  name: string;
}

export async function listSuppliers(companyId: string, q: Q = db()): Promise<SupplierOption[]> {
  const rows = await q('suppliers').where('organization_id', companyId).orderBy('name').select('id', 'name');
  return rows.map((r) => ({ id: Number(r.id), name: r.name }));
}

export async function findSupplier(companyId: string, id: number, q: Q = db()): Promise<SupplierOption | undefined> {
  const r = await q('suppliers').where({ organization_id: companyId, id }).first('id', 'name');
  return r ? { id: Number(r.id), name: r.name } : undefined;
}

/** Names compare as the collation does (case- and accent-insensitive), after trimming. */
export async function findSupplierByName(companyId: string, name: string, q: Q = db()): Promise<SupplierOption | undefined> {
  const r = await q('suppliers').where({ organization_id: companyId, name: name.trim() }).first('id', 'name');
  return r ? { id: Number(r.id), name: r.name } : undefined;
}

/** The supplier with this name, created when it is missing (two imports racing both get it). */
export async function ensureSupplier(companyId: string, name: string, q: Q = db()): Promise<SupplierOption> {
  const clean = name.trim().slice(0, 160);
  const found = await findSupplierByName(companyId, clean, q);
  if (found) return found;
  await q('suppliers').insert({ organization_id: companyId, name: clean }).onConflict(['organization_id', 'name']).ignore();
  return (await findSupplierByName(companyId, clean, q))!;
}
