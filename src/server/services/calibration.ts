import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { calibrateStyle, type StyleCalibration } from '../../lib/calibration/calibrate.ts';
import { MIN_JOBS } from '../../lib/calibration/backtest.ts';
import { unitCostChecks } from '../../lib/calibration/unit-costs.ts';
import type { ApplyInput } from '../../lib/calibration/schema.ts';
import { recipeSchema, type WasteKey } from '../../lib/takeoff/recipe.ts';
import type { Rates } from '../../lib/takeoff/rates.ts';
import { FINISHED_STATUSES } from '../../lib/margins/job.ts';
import * as repo from '../repos/calibration.ts';
import { addRateVersions, rateHistory } from '../repos/rates.ts';
import { addWasteVersions, wasteHistory } from '../repos/waste-versions.ts';
import { updateStyle } from '../repos/styles.ts';
import { billingSettings } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { listStyles, ratesOf, type Style } from './styles.ts';
import { companyToday } from './bids.ts';

interface Options { halfLifeDays?: number }

async function exclusionMap(companyId: string) {
  const list = await repo.listExclusions(companyId);
  const map = new Map<number, Map<string, string>>();
  for (const e of list) map.set(e.jobId, (map.get(e.jobId) ?? new Map()).set(e.scope, e.reason));
  return { list, map };
}

async function calibrate(actor: Actor, styles: Style[], opts: Options, today: string) {
  const [{ jobs, unitCosts }, ex] = await Promise.all([repo.finishedJobs(actor.companyId), exclusionMap(actor.companyId)]);
  const out: (StyleCalibration & { kind: string })[] = [];
  for (const s of styles) {
    if (!jobs.some((j) => j.styleId === s.id)) continue;
    const rates = (await ratesOf(actor.companyId, s)).values;
    out.push({ kind: s.kind, ...calibrateStyle(jobs, { styleId: s.id, styleName: s.name, rates, wastePct: s.recipe.wastePct }, ex.map, { today, halfLifeDays: opts.halfLifeDays }) });
  }
  return { styles: out, unitCosts, exclusions: ex.list, jobs };
}

/** Every style with finished jobs: comparisons, suggestions and their backtests; the rate history. */
export async function getCalibration(actor: Actor, opts: Options = {}) {
  const [styles, today, billing] = await Promise.all([listStyles(actor), companyToday(actor.companyId), billingSettings(actor.companyId)]);
  const r = await calibrate(actor, styles, opts, today);
  const book = new Map((await db()('price_book_items').where('organization_id', actor.companyId).select('sku', 'unit_cost_cents')).map((b) => [String(b.sku), Number(b.unit_cost_cents)]));
  const histories = await Promise.all(r.styles.map(async (s) => [s.styleId, await rateHistory(actor.companyId, s.styleId)] as const));
  const wastes = await Promise.all(r.styles.map(async (s) => [s.styleId, await wasteHistory(actor.companyId, s.styleId)] as const));
  return {
    currency: billing.currency,
    today,
    minJobs: MIN_JOBS,
    halfLifeDays: opts.halfLifeDays ?? null,
    styles: r.styles,
    withoutJobs: styles.filter((s) => !r.styles.some((c) => c.styleId === s.id)).map((s) => ({ styleId: s.id, styleName: s.name })),
    unitCosts: unitCostChecks(r.unitCosts, book),
    exclusions: r.exclusions,
    applications: await repo.listApplications(actor.companyId),
    rateHistory: Object.fromEntries(histories),
    wasteHistory: Object.fromEntries(wastes),
  };
}

/**
 * Applies suggestions the estimator chose: each must still be today's suggestion (else 409,
 * reload) and one the backtest shows improves (else 422). Labour and rental-day rates get new
 * versions with who, when and why; a waste percent is written into the style's recipe under
 * the style's row lock, with a waste version (old, new, who, when, why); each is recorded
 * with its backtest. Bids already saved keep the rates they were priced with.
 */
export async function applyCalibration(actor: Actor, input: ApplyInput) {
  const [styles, today] = await Promise.all([listStyles(actor), companyToday(actor.companyId)]);
  const style = styles.find((s) => s.id === input.styleId);
  if (!style) throw notFound('That fence style');
  const opts = { halfLifeDays: input.halfLifeDays ?? undefined };
  const cal = (await calibrate(actor, [style], opts, today)).styles[0];
  if (!cal) throw new AppError('RULE_BROKEN', `${style.name} has no finished jobs to calibrate from.`, { styleId: 'No finished jobs.' });
  const fields: Record<string, string> = {};
  const chosen = input.items.map((it, i) => {
    const item = cal.items.find((x) => x.key === it.key);
    if (!item) { fields[`items.${i}.key`] = 'This style has no such item.'; return null; }
    if (item.suggested === null) { fields[`items.${i}.key`] = item.reason ?? 'No suggestion.'; return null; }
    if (!item.applicable) { fields[`items.${i}.key`] = 'The backtest does not show this suggestion lowering the error.'; return null; }
    return { item, seen: it.suggested };
  });
  if (Object.keys(fields).length) throw new AppError('RULE_BROKEN', 'Some suggestions cannot be applied.', fields);
  const stale = chosen.filter((c) => Math.abs(c!.seen - c!.item.suggested!) > 1e-9);
  if (stale.length) throw new AppError('CONFLICT', 'The suggestions changed since the page was loaded (new jobs or exclusions). Reload and look again.', { items: stale.map((c) => c!.item.label).join(', ') });

  const rates: Partial<Rates> = {};
  const waste: Partial<Record<WasteKey, number>> = {};
  for (const c of chosen) {
    const v = c!.item.suggestedValues!;
    if (c!.item.kind === 'waste') Object.assign(waste, v);
    else Object.assign(rates, v);
  }
  await db().transaction(async (trx) => {
    // The style's row first, locked: a recipe edit or another calibration of this style waits
    // for this one, and the recipe read next is the one written over (no lost update).
    const locked = await trx('fence_styles').where({ organization_id: actor.companyId, id: style.id }).forUpdate().first('recipe');
    if (!locked) throw notFound('That fence style');
    const reason = `Calibrated from ${cal.jobs - cal.excludedJobs} finished jobs: ${input.reason}`;
    if (Object.keys(waste).length) {
      const stored = recipeSchema.safeParse(typeof locked.recipe === 'string' ? JSON.parse(locked.recipe) : locked.recipe);
      const base = stored.success ? stored.data : style.recipe;
      // A chosen waste percent changed after the calibration read it: its backtest judged the old value.
      const moved = chosen.filter((c) => c!.item.kind === 'waste' && c!.item.wasteKey && base.wastePct[c!.item.wasteKey] !== c!.item.currentValues[c!.item.wasteKey]);
      if (moved.length) throw new AppError('CONFLICT', 'The style\'s waste changed since the page was loaded. Reload and look again.', { items: moved.map((c) => c!.item.label).join(', ') });
      const recipe = recipeSchema.parse({ ...base, wastePct: { ...base.wastePct, ...waste } });
      await updateStyle(actor.companyId, style.id, { recipe }, trx);
      await addWasteVersions(actor.companyId, style.id, base.wastePct, waste, reason, actor.userId, trx);
    }
    if (Object.keys(rates).length) await addRateVersions(actor.companyId, style.id, rates, reason, actor.userId, trx);
    for (const c of chosen) {
      const { item } = c!;
      const bt = item.backtest!;
      await repo.insertApplication(actor.companyId, {
        styleId: style.id, itemKey: item.key, oldValues: item.currentValues, newValues: item.suggestedValues!, jobs: item.n,
        mapeBefore: round4(bt.current.mape), mapeAfter: round4(bt.suggested!.mape), biasBefore: round4(bt.current.bias), biasAfter: round4(bt.suggested!.bias),
        reason: input.reason, createdBy: actor.userId,
      }, trx);
    }
    await audit(trx, actor, 'calibration', style.id, 'apply', { items: chosen.map((c) => ({ key: c!.item.key, from: c!.item.currentValues, to: c!.item.suggestedValues })), reason: input.reason });
  });
  return { applied: chosen.map((c) => ({ key: c!.item.key, values: c!.item.suggestedValues })), ...(await getCalibration(actor, opts)) };
}

const round4 = (x: number) => Math.round(x * 10_000) / 10_000;

/** Leaves a finished job (or one item of it) out of calibration, with the reason. */
export async function addExclusion(actor: Actor, e: { jobId: number; scope: string; reason: string }) {
  const job = await db()('jobs').where({ organization_id: actor.companyId, id: e.jobId }).first('status');
  if (!job) throw notFound('That job');
  if (!FINISHED_STATUSES.includes(job.status)) throw new AppError('RULE_BROKEN', 'Only finished jobs count in calibration.', { jobId: 'This job is not finished.' });
  const id = await db().transaction(async (trx) => {
    const existing = await trx('calibration_exclusions').where({ organization_id: actor.companyId, job_id: e.jobId, scope: e.scope }).first('id');
    if (existing) throw new AppError('CONFLICT', 'That job is already left out.', { scope: 'Already left out.' });
    const newId = await repo.insertExclusion(actor.companyId, { ...e, createdBy: actor.userId }, trx);
    await audit(trx, actor, 'calibration_exclusion', newId, 'create', e);
    return newId;
  });
  return (await repo.listExclusions(actor.companyId)).find((x) => x.id === id)!;
}

export async function removeExclusion(actor: Actor, id: number): Promise<void> {
  await db().transaction(async (trx) => {
    const row = await repo.findExclusion(actor.companyId, id, trx);
    if (!row) throw notFound('That exclusion');
    await repo.deleteExclusion(actor.companyId, id, trx);
    await audit(trx, actor, 'calibration_exclusion', id, 'delete', { jobId: row.job_id, scope: row.scope });
  });
}
