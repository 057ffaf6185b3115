import type { z } from 'zod';
import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { computeBid, type BidInput, type takeoffRequest } from '../../lib/bids/schema.ts';
import { rulesFrom, todayIn } from '../../lib/bids/rules.ts';
import { computeTakeoff } from '../../lib/takeoff/takeoff.ts';
import type { Rates } from '../../lib/takeoff/rates.ts';
import { getSettings } from '../repos/settings.ts';
import * as bids from '../repos/bids.ts';
import { priceMap } from '../repos/pricebook.ts';
import { audit } from '../repos/audit.ts';
import { getJob } from './jobs.ts';
import { getStyle, listStyles, ratesOf, type Style } from './styles.ts';

export async function companyRules(companyId: string) {
  const settings = await getSettings(companyId);
  return { settings, ...rulesFrom(settings) };
}

export async function companyToday(companyId: string): Promise<string> {
  const r = await db()('company_settings').where('organization_id', companyId).first('timezone');
  return todayIn(r?.timezone ?? 'UTC', new Date());
}

/** Sent with every takeoff, so a reader of the numbers alone still gets the caution. */
export const TAKEOFF_NOTICE =
  "Depths and quantities are planning defaults from the style's recipe, not an engineering approval. Locate buried utilities before digging; permits, local codes, manufacturers' instructions and licensed professionals govern.";

/** POST /api/takeoff: the pure takeoff for a saved style or an inline recipe; nothing is saved. */
export async function takeoff(actor: Actor, req: z.output<typeof takeoffRequest>) {
  const { site } = await companyRules(actor.companyId);
  let style: Style | null = null;
  let rates: Rates;
  if (req.styleId !== undefined) {
    style = await getStyle(actor, req.styleId).catch((err) => {
      if (err instanceof AppError && err.code === 'NOT_FOUND') throw new AppError('BAD_INPUT', 'Choose a fence style of this company.', { styleId: 'No such style in this company.' });
      throw err;
    });
    rates = req.rates ?? (await ratesOf(actor.companyId, style)).values;
  } else rates = req.rates!; // the schema requires rates with an inline recipe
  const recipe = style ? style.recipe : req.recipe!;
  const t = computeTakeoff({ runs: req.runs, gates: req.gates, closed: req.closed }, recipe, rates, site);
  if (!t.ok) throw new AppError('BAD_INPUT', 'Some runs or gates need attention.', t.fields);
  return { style: style ? { id: style.id, name: style.name } : null, rates, site, takeoff: t, notice: TAKEOFF_NOTICE };
}

/** Everything the bid builder needs to compute in the browser exactly as the server will. */
export async function builderContext(actor: Actor, jobId: number) {
  const job = await getJob(actor, jobId);
  const [styles, { site, pricing, targetMarginPct, settings }, book, versions] = await Promise.all([
    listStyles(actor), companyRules(actor.companyId), priceMap(actor.companyId), bids.listBids(actor.companyId, jobId),
  ]);
  const active = styles.filter((s) => s.active || s.id === job.fenceStyleId);
  const rates: Record<number, Rates> = {};
  for (const s of active) rates[s.id] = (await ratesOf(actor.companyId, s)).values;
  return {
    job, styles: active, rates, site, pricing, targetMarginPct, currency: settings.currency,
    book: [...book.values()], versions,
  };
}

export async function listBids(actor: Actor, jobId: number) {
  await getJob(actor, jobId);
  return { items: await bids.listBids(actor.companyId, jobId) };
}

export async function getBid(actor: Actor, jobId: number, bidId: number) {
  await getJob(actor, jobId);
  const b = await bids.findBid(actor.companyId, jobId, bidId);
  if (!b) throw notFound('That bid');
  return b;
}

/** Saves a new numbered version, priced on the server from the company's own data. */
export async function saveBid(actor: Actor, jobId: number, input: BidInput) {
  await getJob(actor, jobId);
  const style = await getStyle(actor, input.styleId).catch((err) => {
    if (err instanceof AppError && err.code === 'NOT_FOUND') throw new AppError('BAD_INPUT', 'Choose a fence style of this company.', { styleId: 'No such style in this company.' });
    throw err;
  });
  const [{ site, pricing }, book, rates] = await Promise.all([companyRules(actor.companyId), priceMap(actor.companyId), ratesOf(actor.companyId, style)]);
  const result = computeBid(input, style.recipe, rates.values, site, book, pricing);
  if ('ok' in result && !result.ok) throw new AppError('BAD_INPUT', 'Some runs or gates need attention.', result.fields);
  const { takeoff: t, pricing: p } = result as Exclude<typeof result, { ok: false }>;
  const id = await db().transaction(async (trx) => {
    const versionNo = await bids.nextVersionNo(actor.companyId, jobId, trx);
    const bidId = await bids.insertBid(actor.companyId, {
      jobId, versionNo, status: 'draft', styleId: style.id, styleName: style.name, input, recipe: style.recipe, rates: rates.values,
      rateVersionIds: rates.versionIds, takeoff: t, pricing: p, createdBy: actor.userId,
    }, trx);
    await audit(trx, actor, 'bid', bidId, 'create', { jobId, versionNo, priceCents: p.priceCents });
    return bidId;
  });
  return getBid(actor, jobId, id);
}

export async function patchBid(actor: Actor, jobId: number, bidId: number, patch: { status?: 'draft' | 'sent' | 'declined'; title?: string }) {
  const bid = await getBid(actor, jobId, bidId);
  if (patch.status && (bid.status === 'accepted' || bid.status === 'superseded'))
    throw new AppError('RULE_BROKEN', `Version ${bid.versionNo} is ${bid.status === 'accepted' ? 'accepted' : 'replaced by a later acceptance'}; save a new version instead.`, { status: 'This version can no longer change.' });
  const today = await companyToday(actor.companyId);
  await db().transaction(async (trx) => {
    const row: Record<string, unknown> = {};
    if (patch.title !== undefined) row.title = patch.title;
    if (patch.status) {
      row.status = patch.status;
      if (patch.status === 'sent') row.sent_at = trx.fn.now(3);
      if (patch.status === 'declined') row.declined_at = trx.fn.now(3);
    }
    await bids.setStatus(actor.companyId, bidId, row, trx);
    if (patch.status === 'sent')
      await trx('jobs').where({ organization_id: actor.companyId, id: jobId }).whereIn('status', ['lead', 'measured']).update({ status: 'bid_sent', bid_date: today, updated_at: trx.fn.now(3) });
    await audit(trx, actor, 'bid', bidId, 'update', patch);
  });
  return getBid(actor, jobId, bidId);
}

export async function deleteBid(actor: Actor, jobId: number, bidId: number): Promise<void> {
  const bid = await getBid(actor, jobId, bidId);
  if (bid.status !== 'draft') throw new AppError('RULE_BROKEN', 'Only a draft can be deleted; a sent or accepted version stays on record.', { status: 'Not a draft.' });
  await db().transaction(async (trx) => {
    await trx('bids').where({ organization_id: actor.companyId, id: bidId }).delete();
    await audit(trx, actor, 'bid', bidId, 'delete', { jobId, versionNo: bid.versionNo });
  });
}

/**
 * Accepting a version fixes the job: its contract price and its estimated cost by
 * category. A version accepted before it is marked replaced; the job counts as won.
 */
export async function acceptBid(actor: Actor, jobId: number, bidId: number) {
  const bid = await getBid(actor, jobId, bidId);
  if (bid.status === 'accepted') return bid;
  if (bid.status === 'superseded') throw new AppError('RULE_BROKEN', 'This version was replaced; save it again as a new version to accept it.');
  const unpriced = bid.lines.filter((l) => !l.priced);
  if (unpriced.length)
    throw new AppError('RULE_BROKEN', `Price every line before accepting: no price for ${unpriced.map((l) => l.description).join(', ')}.`, { lines: `${unpriced.length} line(s) have no price.` });
  const today = await companyToday(actor.companyId);
  await db().transaction(async (trx) => {
    await trx('jobs').where({ organization_id: actor.companyId, id: jobId }).forUpdate().first('id');
    await trx('bids').where({ organization_id: actor.companyId, job_id: jobId, status: 'accepted' }).update({ status: 'superseded', updated_at: trx.fn.now(3) });
    await bids.setStatus(actor.companyId, bidId, { status: 'accepted', accepted_at: trx.fn.now(3), accepted_by: actor.userId }, trx);
    await bids.writeEstimates(actor.companyId, jobId, bidId, bid.priceCents, bid.costByCategory, trx);
    await trx('jobs').where({ organization_id: actor.companyId, id: jobId }).whereIn('status', ['lead', 'measured', 'bid_sent', 'lost']).update({ status: 'won', updated_at: trx.fn.now(3) });
    await trx('jobs').where({ organization_id: actor.companyId, id: jobId }).whereNull('decided_date').update({ decided_date: today });
    await audit(trx, actor, 'bid', bidId, 'accept', { jobId, versionNo: bid.versionNo, priceCents: bid.priceCents });
  });
  return getBid(actor, jobId, bidId);
}

export async function jobEstimates(actor: Actor, jobId: number) {
  return bids.jobEstimates(actor.companyId, jobId);
}

/** A job and one of its bid versions for a page, or null for the 404 page. */
export async function jobAndBid(actor: Actor, jobId: number | null, bidId: number | null) {
  if (!jobId || !bidId) return null;
  try {
    const job = await getJob(actor, jobId);
    return { job, bid: await getBid(actor, jobId, bidId) };
  } catch (err) {
    if (err instanceof AppError && err.code === 'NOT_FOUND') return null;
    throw err;
  }
}
