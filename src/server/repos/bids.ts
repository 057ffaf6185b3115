import type { Knex } from 'knex';
import { db } from '../db.ts';
import { COST_CATEGORIES, type CostCategory } from '../../lib/costs/categories.ts';
import type { BidInput, BidStatus } from '../../lib/bids/schema.ts';
import type { Recipe } from '../../lib/takeoff/recipe.ts';
import type { Takeoff } from '../../lib/takeoff/takeoff.ts';
import type { Pricing, PricedLine } from '../../lib/pricing/price.ts';
import type { RateKind, Rates } from '../../lib/takeoff/rates.ts';
import { roundTo } from '../../lib/units.ts';

type Q = Knex | Knex.Transaction;

export interface BidSummary {
  id: number;
  jobId: number;
  versionNo: number;
  status: BidStatus;
  title: string;
  styleId: number | null;
  styleName: string;
  costCents: number;
  priceCents: number;
  taxCents: number;
  totalCents: number;
  marginPct: number | null;
  markupPct: number | null;
  fenceFt: number;
  gateCount: number;
  unpricedLines: number;
  createdByName: string | null;
  createdAt: string;
  sentAt: string | null;
  acceptedAt: string | null;
}

export interface BidDetail extends BidSummary {
  input: BidInput;
  recipe: Recipe;
  takeoff: Takeoff;
  warnings: string[];
  scope: string;
  terms: string;
  exclusions: string;
  exactPriceCents: number;
  taxableCents: number;
  costByCategory: Record<CostCategory, number>;
  lines: PricedLine[];
  rates: { kind: RateKind; value: number; rateVersionId: number | null }[];
  labour: { task: string; crewHours: number; manHours: number }[];
}

const json = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;
const iso = (v: unknown) => (v ? new Date(v as string).toISOString() : null);
const num = (v: unknown) => (v == null ? null : Number(v));

function summary(r: Record<string, unknown>): BidSummary {
  return {
    id: Number(r.id), jobId: Number(r.job_id), versionNo: Number(r.version_no), status: r.status as BidStatus, title: r.title as string,
    styleId: num(r.style_id), styleName: r.style_name as string, costCents: Number(r.cost_cents), priceCents: Number(r.price_cents),
    taxCents: Number(r.tax_cents), totalCents: Number(r.total_cents), marginPct: num(r.margin_pct), markupPct: num(r.markup_pct),
    fenceFt: Number(r.fence_ft), gateCount: Number(r.gate_count), unpricedLines: Number(r.unpriced_lines ?? 0),
    createdByName: (r.created_by_name as string) ?? null, createdAt: iso(r.created_at)!, sentAt: iso(r.sent_at), acceptedAt: iso(r.accepted_at),
  };
}

function selectBids(q: Q, companyId: string) {
  return q('bids as b')
    .leftJoin('user as u', 'u.id', 'b.created_by')
    .where('b.organization_id', companyId)
    .select('b.*', 'u.name as created_by_name', q.raw('(SELECT COUNT(*) FROM bid_lines l WHERE l.bid_id = b.id AND l.priced = 0) AS unpriced_lines'));
}

export async function listBids(companyId: string, jobId: number, q: Q = db()): Promise<BidSummary[]> {
  const rows = await selectBids(q, companyId).andWhere('b.job_id', jobId).orderBy('b.version_no', 'desc');
  return rows.map(summary);
}

export async function findBid(companyId: string, jobId: number, bidId: number, q: Q = db()): Promise<BidDetail | undefined> {
  const r = await selectBids(q, companyId).andWhere({ 'b.job_id': jobId, 'b.id': bidId }).first();
  if (!r) return undefined;
  const [lines, cats, rates, labour] = await Promise.all([
    q('bid_lines').where({ organization_id: companyId, bid_id: bidId }).orderBy('sort'),
    q('bid_cost_categories').where({ organization_id: companyId, bid_id: bidId }),
    q('bid_rate_snapshots').where({ organization_id: companyId, bid_id: bidId }).orderBy('id'),
    q('bid_labour').where({ organization_id: companyId, bid_id: bidId }).orderBy('id'),
  ]);
  const costByCategory = Object.fromEntries(COST_CATEGORIES.map((c) => [c, 0])) as Record<CostCategory, number>;
  for (const c of cats) costByCategory[c.category as CostCategory] = Number(c.amount_cents);
  return {
    ...summary(r),
    input: json(r.input), recipe: json(r.recipe), takeoff: json(r.takeoff), warnings: json(r.warnings),
    scope: r.scope ?? '', terms: r.terms ?? '', exclusions: r.exclusions ?? '',
    exactPriceCents: Number(r.exact_price_cents), taxableCents: Number(r.taxable_cents), costByCategory,
    lines: lines.map((l) => ({
      key: l.line_key, category: l.category, kind: l.kind, description: l.description, sku: l.sku ?? null, unit: l.unit, qty: Number(l.qty),
      unitCostCents: Number(l.unit_cost_cents), amountCents: Number(l.amount_cents), priced: Boolean(l.priced), overridden: Boolean(l.overridden),
      original: l.overridden ? { qty: Number(l.original_qty), unitCostCents: Number(l.original_unit_cost_cents), amountCents: Number(l.original_amount_cents) } : null,
      note: l.override_note ?? '', itemId: num(l.item_id), supplierName: l.supplier_name ?? null, lastSeenOn: l.last_seen_on ?? null,
      takeoffQty: num(l.takeoff_qty), wastePct: num(l.waste_pct),
    })),
    rates: rates.map((x) => ({ kind: x.kind, value: Number(x.value), rateVersionId: num(x.rate_version_id) })),
    labour: labour.map((x) => ({ task: x.task, crewHours: Number(x.crew_hours), manHours: Number(x.man_hours) })),
  };
}

/** Locks the job row, so two saves of the same job never take the same version number. */
export async function nextVersionNo(companyId: string, jobId: number, trx: Knex.Transaction): Promise<number> {
  await trx('jobs').where({ organization_id: companyId, id: jobId }).forUpdate().first('id');
  const r = await trx('bids').where({ organization_id: companyId, job_id: jobId }).max({ n: 'version_no' }).first();
  return Number(r?.n ?? 0) + 1;
}

export interface NewBid {
  jobId: number;
  versionNo: number;
  status: BidStatus;
  styleId: number;
  styleName: string;
  input: BidInput;
  recipe: Recipe;
  rates: Rates;
  rateVersionIds: Partial<Record<RateKind, number>>;
  takeoff: Takeoff;
  pricing: Pricing;
  createdBy: string | null;
  createdAt?: Date;
  sentAt?: Date | null;
  acceptedAt?: Date | null;
  acceptedBy?: string | null;
  declinedAt?: Date | null;
}

/** Writes a bid version with its takeoff quantities, lines, cost by category and rate snapshot. */
export async function insertBid(companyId: string, b: NewBid, trx: Knex.Transaction): Promise<number> {
  const t = b.takeoff;
  const p = b.pricing;
  const org = { organization_id: companyId };
  const at = b.createdAt ? { created_at: b.createdAt, updated_at: b.createdAt } : {};
  const [id] = await trx('bids').insert({
    ...org, ...at, job_id: b.jobId, version_no: b.versionNo, status: b.status, title: b.input.title, style_id: b.styleId, style_name: b.styleName,
    input: JSON.stringify(b.input), recipe: JSON.stringify(b.recipe), takeoff: JSON.stringify(t), warnings: JSON.stringify([...t.warnings, ...p.warnings]),
    scope: b.input.scope, terms: b.input.terms, exclusions: b.input.exclusions, target_mode: p.target.mode, target_pct: p.target.pct,
    cost_cents: p.costCents, exact_price_cents: p.exactPriceCents, price_cents: p.priceCents, taxable_cents: p.taxableCents, tax_cents: p.taxCents, total_cents: p.totalCents,
    margin_pct: p.marginPct === null ? null : roundTo(p.marginPct, 4), markup_pct: p.markupPct === null ? null : roundTo(Math.min(p.markupPct, 99999), 4),
    total_length_ft: t.totalLengthFt, fence_ft: t.fenceFt, bay_count: t.bays, post_count: t.posts.total, end_posts: t.posts.end, corner_posts: t.posts.corner,
    line_posts: t.posts.line, gate_posts: t.posts.gate, hole_count: t.holes, gate_count: t.gates.single + t.gates.double, gate_leaves: t.gates.leaves,
    concrete_cuft: t.concrete?.cuFt ?? null, concrete_bags: t.concrete?.bags ?? null, gravel_cuft: t.gravel?.cuFt ?? null, gravel_bags: t.gravel?.bags ?? null,
    board_feet: roundTo(t.materials.reduce((a, m) => a + (m.boardFeet ?? 0), 0), 3), rental_days: t.rentals.reduce((a, r) => a + r.days, 0),
    labour_hours: roundTo(t.labour.reduce((a, l) => a + l.manHours, 0), 3), crew_size: b.rates.crew_size,
    created_by: b.createdBy, sent_at: b.sentAt ?? null, accepted_at: b.acceptedAt ?? null, accepted_by: b.acceptedBy ?? null, declined_at: b.declinedAt ?? null,
  });
  const bidId = Number(id);
  const buyBySku = new Map(t.materials.map((m) => [m.sku, m]));
  if (p.lines.length) {
    await trx('bid_lines').insert(p.lines.map((l, i) => ({
      ...org, bid_id: bidId, sort: i, line_key: l.key, kind: l.kind, category: l.category, description: l.description.slice(0, 255), sku: l.sku, item_id: l.itemId,
      unit: l.unit, takeoff_qty: l.takeoffQty, waste_pct: l.wastePct, buy_qty: l.sku && l.kind === 'material' ? buyBySku.get(l.sku)?.buyQty ?? null : null,
      qty: roundTo(l.qty, 4), unit_cost_cents: l.unitCostCents, amount_cents: l.amountCents, priced: l.priced, overridden: l.overridden,
      original_qty: l.original ? roundTo(l.original.qty, 4) : null, original_unit_cost_cents: l.original?.unitCostCents ?? null, original_amount_cents: l.original?.amountCents ?? null,
      override_note: l.note || null, supplier_name: l.supplierName, last_seen_on: l.lastSeenOn,
    })));
  }
  await trx('bid_cost_categories').insert(COST_CATEGORIES.map((c) => ({ ...org, bid_id: bidId, category: c, amount_cents: p.costByCategory[c] })));
  await trx('bid_labour').insert(t.labour.map((l) => ({ ...org, bid_id: bidId, task: l.task, crew_hours: l.crewHours, man_hours: l.manHours })));
  await trx('bid_rate_snapshots').insert((Object.keys(b.rates) as RateKind[]).map((kind) => ({ ...org, bid_id: bidId, kind, value: b.rates[kind], rate_version_id: b.rateVersionIds[kind] ?? null })));
  return bidId;
}

export async function setStatus(companyId: string, bidId: number, patch: Record<string, unknown>, q: Q = db()): Promise<void> {
  await q('bids').where({ organization_id: companyId, id: bidId }).update({ ...patch, updated_at: q.fn.now(3) });
}

/**
 * Fixes a job's estimate from an accepted bid: the contract price and one source='bid' row
 * per cost category. Change-order rows are never touched.
 */
export async function writeEstimates(companyId: string, jobId: number, bidId: number, priceCents: number, costByCategory: Record<CostCategory, number>, trx: Knex.Transaction): Promise<void> {
  await trx('jobs').where({ organization_id: companyId, id: jobId }).update({ contract_cents: priceCents, updated_at: trx.fn.now(3) });
  await trx('job_estimates').where({ organization_id: companyId, job_id: jobId, source: 'bid' }).delete();
  await trx('job_estimates').insert(COST_CATEGORIES.map((c) => ({ organization_id: companyId, job_id: jobId, category: c, amount_cents: costByCategory[c], source: 'bid', source_id: bidId })));
}

/** A job's estimated cost by category (accepted bid plus approved change orders). */
export async function jobEstimates(companyId: string, jobId: number, q: Q = db()): Promise<{ category: CostCategory; source: string; amountCents: number }[]> {
  const rows = (await q('job_estimates').where({ organization_id: companyId, job_id: jobId }).groupBy('category', 'source').select('category', 'source').sum({ cents: 'amount_cents' })) as { category: CostCategory; source: string; cents: string | number }[];
  return rows.map((r) => ({ category: r.category, source: r.source, amountCents: Number(r.cents) }));
}
