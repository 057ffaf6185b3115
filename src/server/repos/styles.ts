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

export interface StyleRow extends StyleSummary {
  description: string | null;
  /** null for a style whose recipe has not been written yet */
  recipe: unknown;
}

function parseJson(v: unknown): unknown {
  if (v == null) return null;
  return typeof v === 'string' ? JSON.parse(v) : v;
}

function styleRow(r: Record<string, unknown>): StyleRow {
  return { id: Number(r.id), name: r.name as string, kind: r.kind as string, active: Boolean(r.active), description: (r.description as string) ?? null, recipe: parseJson(r.recipe) };
}

export async function listStylesWithRecipes(companyId: string, q: Q = db()): Promise<StyleRow[]> {
  const rows = await q('fence_styles').where('organization_id', companyId).orderBy('name').select('id', 'name', 'kind', 'active', 'description', 'recipe');
  return rows.map(styleRow);
}

export async function findStyle(companyId: string, id: number, q: Q = db()): Promise<StyleRow | undefined> {
  const r = await q('fence_styles').where({ organization_id: companyId, id }).first('id', 'name', 'kind', 'active', 'description', 'recipe');
  return r ? styleRow(r) : undefined;
}

export async function insertStyle(companyId: string, s: { name: string; kind: string; description: string | null; recipe: unknown; active: boolean }, q: Q = db()): Promise<number> {
  const [id] = await q('fence_styles').insert({ organization_id: companyId, name: s.name, kind: s.kind, description: s.description, recipe: JSON.stringify(s.recipe), active: s.active });
  return Number(id);
}

export async function updateStyle(companyId: string, id: number, s: Partial<{ name: string; kind: string; description: string | null; recipe: unknown; active: boolean }>, q: Q = db()): Promise<void> {
  const row: Record<string, unknown> = {};
  for (const k of ['name', 'kind', 'description', 'active'] as const) if (k in s) row[k] = s[k];
  if ('recipe' in s) row.recipe = JSON.stringify(s.recipe);
  await q('fence_styles').where({ organization_id: companyId, id }).update({ ...row, updated_at: q.fn.now(3) });
}
