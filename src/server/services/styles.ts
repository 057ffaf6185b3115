import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { recipeSchema, type Recipe } from '../../lib/takeoff/recipe.ts';
import type { Rates } from '../../lib/takeoff/rates.ts';
import { recipeFor, ratesFor } from '../../lib/takeoff/defaults.ts';
import type { z } from 'zod';
import type { styleInput } from '../../lib/takeoff/recipe.ts';
import * as styles from '../repos/styles.ts';
import * as rates from '../repos/rates.ts';
import { addWasteVersions } from '../repos/waste-versions.ts';
import { audit } from '../repos/audit.ts';

export interface Style {
  id: number;
  name: string;
  kind: string;
  description: string | null;
  active: boolean;
  recipe: Recipe;
  /** true when the stored recipe was missing or unreadable and the kind's default stands in */
  recipeFromDefault: boolean;
}

function toStyle(row: styles.StyleRow): Style {
  const parsed = recipeSchema.safeParse(row.recipe);
  return {
    id: row.id, name: row.name, kind: row.kind, description: row.description, active: row.active,
    recipe: parsed.success ? parsed.data : recipeFor(row.kind), recipeFromDefault: !parsed.success,
  };
}

export async function listStyles(actor: Actor): Promise<Style[]> {
  return (await styles.listStylesWithRecipes(actor.companyId)).map(toStyle);
}

export async function getStyle(actor: Actor, id: number): Promise<Style> {
  const row = await styles.findStyle(actor.companyId, id);
  if (!row) throw notFound('That fence style');
  return toStyle(row);
}

function duplicateName(name: string) {
  return new AppError('CONFLICT', `There is already a style named ${name}.`, { name: 'Another style has this name.' });
}

export async function createStyle(actor: Actor, input: z.output<typeof styleInput>): Promise<Style> {
  const id = await db().transaction(async (trx) => {
    if (await trx('fence_styles').where({ organization_id: actor.companyId, name: input.name }).first('id')) throw duplicateName(input.name);
    const newId = await styles.insertStyle(actor.companyId, input, trx);
    await rates.addRateVersions(actor.companyId, newId, ratesFor(input.kind), 'Starting rates for a new style', actor.userId, trx);
    await addWasteVersions(actor.companyId, newId, null, input.recipe.wastePct, 'Starting waste for a new style', actor.userId, trx);
    await audit(trx, actor, 'fence_style', newId, 'create', { name: input.name });
    return newId;
  });
  return getStyle(actor, id);
}

/** A hand edit of a style; a change of a waste percent is kept as a waste version, as calibration's are. */
export async function updateStyle(actor: Actor, id: number, input: Partial<z.output<typeof styleInput>>): Promise<Style> {
  await getStyle(actor, id);
  await db().transaction(async (trx) => {
    // The row lock first, so the waste recorded as "before" is what this write replaces.
    const locked = await trx('fence_styles').where({ organization_id: actor.companyId, id }).forUpdate().first('recipe');
    if (!locked) throw notFound('That fence style');
    if (input.name && (await trx('fence_styles').where({ organization_id: actor.companyId, name: input.name }).whereNot('id', id).first('id'))) throw duplicateName(input.name);
    if (input.recipe) {
      const before = recipeSchema.safeParse(typeof locked.recipe === 'string' ? JSON.parse(locked.recipe) : locked.recipe);
      await addWasteVersions(actor.companyId, id, before.success ? before.data.wastePct : null, input.recipe.wastePct, 'Changed by hand in the style\'s recipe', actor.userId, trx);
    }
    await styles.updateStyle(actor.companyId, id, input, trx);
    await audit(trx, actor, 'fence_style', id, 'update', { fields: Object.keys(input) });
  });
  return getStyle(actor, id);
}

/** The current rates of a style: the stored versions, with the kind's defaults for any never set. */
export async function ratesOf(companyId: string, style: { id: number; kind: string }): Promise<{ values: Rates; versionIds: Partial<Record<keyof Rates, number>> }> {
  const cur = await rates.currentRates(companyId, style.id);
  return { values: { ...ratesFor(style.kind), ...cur.values }, versionIds: cur.versionIds };
}

export async function listRates(actor: Actor) {
  const all = await listStyles(actor);
  const items = [];
  for (const s of all) items.push({ styleId: s.id, styleName: s.name, kind: s.kind, active: s.active, ...(await ratesOf(actor.companyId, s)) });
  return { items };
}

export async function rateHistory(actor: Actor, styleId: number) {
  const style = await getStyle(actor, styleId);
  return { style: { id: style.id, name: style.name, kind: style.kind }, current: await ratesOf(actor.companyId, style), history: await rates.rateHistory(actor.companyId, styleId) };
}

/** New rate versions with who, when and why; a value equal to the current one is not a change. */
export async function setRates(actor: Actor, styleId: number, values: Partial<Rates>, reason: string) {
  await getStyle(actor, styleId);
  const written = await db().transaction(async (trx) => {
    // The style's row first, locked, as calibration does: two rate edits (or an edit and a
    // calibration) of one style number their versions one after the other.
    const locked = await trx('fence_styles').where({ organization_id: actor.companyId, id: styleId }).forUpdate().first('id');
    if (!locked) throw notFound('That fence style');
    const n = await rates.addRateVersions(actor.companyId, styleId, values, reason, actor.userId, trx);
    if (n) await audit(trx, actor, 'labour_rates', styleId, 'version', { values, reason });
    return n;
  });
  return { written, ...(await rateHistory(actor, styleId)) };
}

