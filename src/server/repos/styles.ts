import type { Knex } from 'knex';
import { db } from '../db.ts';

type Q = Knex | Knex.Transaction;

export interface StyleSummary {
  id: number;
  name: string;
  kind: string;
  active: boolean;
}

export async function listStyles(companyId: string, q: Q = db()): Promise<StyleSummary[]> {
  const rows = await q('fence_styles').where('organization_id', companyId).orderBy('name').select('id', 'name', 'kind', 'active');
  return rows.map((r) => ({ id: Number(r.id), name: r.name, kind: r.kind, active: Boolean(r.active) }));
}

export async function styleExists(companyId: string, id: number, q: Q = db()): Promise<boolean> {
  return Boolean(await q('fence_styles').where({ organization_id: companyId, id }).first('id'));
}
