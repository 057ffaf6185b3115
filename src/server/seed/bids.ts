import type { Knex } from 'knex';
import { rng } from '../../lib/random.ts';
import { DEMO, DEMO_USERS } from './demo.ts';
import { bidInput, computeBid, type BidInput, type BidStatus } from '../../lib/bids/schema.ts';
import { rulesFrom } from '../../lib/bids/rules.ts';
import { recipeSchema, recipeSkus, type Recipe } from '../../lib/takeoff/recipe.ts';
import { DEFAULT_RECIPES, ratesFor } from '../../lib/takeoff/defaults.ts';
import type { RateKind, Rates } from '../../lib/takeoff/rates.ts';
import { locateDates } from '../../lib/checklist/checklist.ts';
import type { CostCategory } from '../../lib/costs/categories.ts';
import { getSettings } from '../repos/settings.ts';
import { priceMap, supplierId } from '../repos/pricebook.ts';
import { addRateVersions } from '../repos/rates.ts';
import { insertBid, writeEstimates } from '../repos/bids.ts';
import { seedDefaultRates } from '../services/company-defaults.ts';

/** The demo's invented suppliers; the costs seed reuses these names. */
export const DEMO_SUPPLIERS = ['Cedar Hollow Lumber', 'Ironbridge Fence Supply', 'Millrace Hardware & Rental'] as const;
const [YARD, FENCE, RENTAL] = DEMO_SUPPLIERS;

/** Invented unit costs, cents, and who sells each item. */
const PRICES: Record<string, [number, string, string?, CostCategory?, string?]> = {
  'PT-4X4-08': [1198, YARD], 'PT-4X4-10': [1549, YARD], 'PT-4X4-12': [1989, YARD],
  'PT-2X4-08': [548, YARD], 'PT-2X4-10': [712, YARD], 'PT-2X4-12': [889, YARD], 'PT-2X4-16': [1249, YARD],
  'PT-2X6-08': [899, YARD], 'PT-2X6-12': [1398, YARD], 'PT-2X6-16': [1949, YARD],
  'CED-PKT-1X6-6': [389, YARD], 'CONC-50': [649, YARD, 'bag'], 'GRAVEL-05': [548, YARD, 'bag'], 'SCREW-EXT-5LB': [4299, YARD, 'box'],
  'STAPLE-1LB': [899, YARD, 'box'], 'WW-PANEL-16': [3899, FENCE], 'SR-POST-3H-7': [2450, FENCE], 'SR-RAIL-10': [1675, FENCE],
  'CL-LINE-6': [1895, FENCE], 'CL-LINE-8': [2395, FENCE], 'CL-LINE-9': [2695, FENCE], 'CL-TERM-7': [3295, FENCE], 'CL-TERM-9': [3995, FENCE], 'CL-RAIL-21': [3450, FENCE],
  'CL-FABRIC-36': [9900, FENCE, 'roll'], 'CL-FABRIC-42': [11400, FENCE, 'roll'], 'CL-FABRIC-48': [12900, FENCE, 'roll'], 'CL-FABRIC-60': [15900, FENCE, 'roll'], 'CL-FABRIC-72': [18900, FENCE, 'roll'],
  'CL-TERM-KIT': [1850, FENCE, 'kit'], 'CL-LOOP-CAP': [325, FENCE], 'CL-TIES-100': [1195, FENCE, 'bag'],
  'CL-GATE-4': [13900, FENCE], 'CL-GATE-DBL': [38900, FENCE], 'VIN-POST-9': [5490, FENCE], 'VIN-PANEL-6X8': [14900, FENCE], 'VIN-CAP': [690, FENCE],
  'VIN-GATE-4': [32900, FENCE], 'VIN-GATE-DBL': [74900, FENCE], 'ORN-POST-6': [3890, FENCE], 'ORN-POST-8': [4790, FENCE], 'ORN-PANEL-4X6': [15900, FENCE],
  'ORN-BRACKET': [425, FENCE], 'ORN-GATE-4': [27900, FENCE], 'ORN-GATE-DBL': [69900, FENCE], 'GATE-WOOD-4': [16500, YARD, 'kit'],
  'GATE-WOOD-DBL': [38500, YARD, 'kit'], 'GATE-SR-4': [18900, FENCE], 'GATE-SR-DBL': [42900, FENCE], 'GATE-WW-4': [14500, YARD, 'kit'],
  'RENT-AUGER-DAY': [16500, RENTAL, 'day', 'rental', 'Two-person earth auger, day'], 'RENT-AUGER-HALF': [11000, RENTAL, 'half day', 'rental', 'Two-person earth auger, half day'],
  'PERMIT-FENCE': [7500, 'City of Wrenfield (demo)', 'each', 'permit', 'Wrenfield fence permit fee'],
  'DUMP-LOAD': [6500, RENTAL, 'load', 'disposal', 'Brush and old-fence dump load'],
};

const LATER_ITEMS = new Set(['CL-LINE-9', 'CL-FABRIC-36', 'CL-FABRIC-42', 'CL-FABRIC-60', 'CL-FABRIC-72']);

/** A typical height (in) per style kind for the demo layouts. */
const HEIGHTS: Record<string, number[]> = { wood_privacy: [72, 72, 60], split_rail: [48, 42], wire_panel: [42, 48], chain_link: [48, 60], vinyl: [72, 60], ornamental: [48, 54] };
const DAY = 86_400_000;

async function ratesAt(trx: Knex.Transaction, styleId: number, kind: string, at: Date): Promise<{ values: Rates; versionIds: Partial<Record<RateKind, number>> }> {
  const rows = await trx('labour_rates as r').join('labour_rate_versions as v', 'v.rate_id', 'r.id')
    .where({ 'r.organization_id': DEMO.orgId, 'r.style_id': styleId }).andWhere('v.created_at', '<=', at)
    .orderBy('v.version_no').select('r.kind', 'v.id', 'v.value');
  const values = ratesFor(kind);
  const versionIds: Partial<Record<RateKind, number>> = {};
  for (const r of rows) { values[r.kind as RateKind] = Number(r.value); versionIds[r.kind as RateKind] = Number(r.id); }
  return { values, versionIds };
}

/**
 * The demo's price book, style recipes, labour-rate versions, bids (drafts for leads, sent
 * versions, an accepted one for every won job, a declined one for lost jobs) and pre-dig
 * checklists. Accepted bids replace the interim contract prices and estimates.
 */
export async function seedDemoBids(knex: Knex, today = new Date()): Promise<void> {
  if (!(await knex('organization').where('id', DEMO.orgId).first('id'))) return;
  if (await knex('bids').where('organization_id', DEMO.orgId).first('id')) return;
  const r = rng(DEMO.seed + 3);
  const now = new Date(Math.floor(today.getTime() / DAY) * DAY);
  const iso = (d: Date) => d.toISOString().slice(0, 10);
  const estimator = DEMO_USERS[2].id;
  const owner = DEMO_USERS[0].id;

  await knex.transaction(async (trx) => {
    await trx('company_settings').where('organization_id', DEMO.orgId).update({
      frost_depth_in: 24, permit_max_front_in: 48, permit_max_side_in: 72, permit_max_back_in: 72,
      locate_wait_business_days: 2, locate_valid_days: 14, locate_valid_basis: 'calendar', business_days: '1,2,3,4,5',
      holidays: JSON.stringify([`${now.getUTCFullYear()}-12-25`, `${now.getUTCFullYear() + 1}-01-01`, `${now.getUTCFullYear() + 1}-12-25`]),
    });

    const styles = await trx('fence_styles').where('organization_id', DEMO.orgId).orderBy('id').select('id', 'kind', 'name', 'recipe');
    for (const s of styles) if (!s.recipe && DEFAULT_RECIPES[s.kind]) await trx('fence_styles').where('id', s.id).update({ recipe: JSON.stringify(DEFAULT_RECIPES[s.kind]) });

    // Items added to the demo later draw their dates from their own stream, so the rest of the demo stays as it was.
    const later = rng(DEMO.seed + 31);
    const names = new Map<string, string>();
    for (const s of styles) for (const x of recipeSkus(DEFAULT_RECIPES[s.kind])) names.set(x.sku, x.label);
    for (const [sku, [cents, supplier, unit, category, name]] of Object.entries(PRICES)) {
      const sup = await supplierId(DEMO.orgId, supplier, trx);
      const seen = iso(new Date(now.getTime() - (LATER_ITEMS.has(sku) ? later : r).int(3, 75) * DAY));
      const [id] = await trx('price_book_items').insert({
        organization_id: DEMO.orgId, sku, name: name ?? names.get(sku) ?? sku, category: category ?? 'material', unit: unit ?? 'each',
        unit_cost_cents: cents, supplier_id: sup, last_seen_on: seen, created_at: new Date(now.getTime() - 500 * DAY),
      });
      // A few prices went up lately; the estimator has not looked yet.
      if (['PT-4X4-10', 'CED-PKT-1X6-6', 'CONC-50', 'CL-FABRIC-48'].includes(sku)) {
        await trx('price_book_changes').insert({
          organization_id: DEMO.orgId, item_id: id, old_unit_cost_cents: Math.round(cents * 0.93), new_unit_cost_cents: cents, supplier_id: sup,
          source: sku === 'CONC-50' ? 'csv_import' : 'manual', source_ref: sku === 'CONC-50' ? 'yard-price-list.csv' : null, changed_by: owner,
          seen_by_estimator: false, created_at: new Date(now.getTime() - r.int(1, 9) * DAY),
        });
      }
    }

    const created = new Date(now.getTime() - 548 * DAY);
    await seedDefaultRates(trx, DEMO.orgId, estimator, created);
    const wood = styles.find((s) => s.kind === 'wood_privacy');
    if (wood) {
      await addRateVersions(DEMO.orgId, Number(wood.id), { rails_infill_hours_per_ft: 0.055, hole_hours: 0.18 }, 'Spring jobs in clay ran long on holes and pickets', estimator, trx, new Date(now.getTime() - 220 * DAY));
      await addRateVersions(DEMO.orgId, Number(wood.id), { crew_wage_cents: 3000 }, 'Crew raise in the new season', owner, trx, new Date(now.getTime() - 120 * DAY));
    }

    const settings = await getSettings(DEMO.orgId, trx);
    const { site, pricing } = rulesFrom(settings);
    const book = await priceMap(DEMO.orgId, trx);
    const jobs = await trx('jobs').where('organization_id', DEMO.orgId).orderBy('id')
      .select('id', 'status', 'fence_style_id', 'lead_date', 'measure_date', 'bid_date', 'decided_date', 'start_date', 'commercial');

    for (const job of jobs) {
      const style = styles.find((s) => Number(s.id) === Number(job.fence_style_id));
      if (!style || job.status === 'lead' && r.chance(0.5)) continue;
      const recipe: Recipe = recipeSchema.parse(typeof style.recipe === 'string' ? JSON.parse(style.recipe) : style.recipe ?? DEFAULT_RECIPES[style.kind]);
      const heightIn = r.pick(HEIGHTS[style.kind] ?? [72]);
      const nRuns = r.int(1, 3);
      const headings = [0, 90, 180];
      const runs = Array.from({ length: nRuns }, (_, i) => ({
        label: ['Back line', 'Side line', 'Far side', ''][i] ?? '', lengthFt: r.int(job.commercial ? 60 : 24, job.commercial ? 220 : 130),
        heightIn, headingDeg: headings[i], connectsToPrevious: i > 0, yard: i === 0 ? 'back' : r.pick(['side', 'back'] as const),
      }));
      const gates: BidInput['gates'] = [];
      if (r.chance(0.8)) gates.push({ runIndex: nRuns - 1, widthFt: 4, kind: 'single', offsetFt: null });
      // A double drive gate on the first run: centred when the walk gate is on another run,
      // else 4 ft in from the corner, clear of the walk gate at the middle.
      if (recipe.gates.double && r.chance(0.25)) {
        if (nRuns > 1 && runs[0].lengthFt >= 20) gates.push({ runIndex: 0, widthFt: 10, kind: 'double', offsetFt: null });
        else if (runs[0].lengthFt >= 40) gates.push({ runIndex: 0, widthFt: 10, kind: 'double', offsetFt: 4 });
      }
      const extras: BidInput['extras'] = [];
      if (runs.some((x) => x.heightIn > 48 && x.yard !== 'back')) extras.push({ category: 'permit', description: 'Fence permit', amountCents: 7500 });
      if (r.chance(0.35)) extras.push({ category: 'disposal', description: 'Haul away the old fence', amountCents: r.pick([6500, 13000]) });
      const statuses: BidStatus[] =
        job.status === 'lead' || job.status === 'measured' ? ['draft']
        : job.status === 'bid_sent' ? (r.chance(0.3) ? ['sent', 'sent'] : ['sent'])
        : job.status === 'lost' ? ['declined']
        : r.chance(0.35) ? ['sent', 'accepted'] : ['accepted'];
      const baseDay = new Date(`${job.bid_date ?? job.measure_date ?? job.lead_date}T15:00:00Z`);
      for (const [v, status] of statuses.entries()) {
        const marginPct = v === 0 && statuses.length > 1 ? settings.targetMarginPct + 4 : settings.targetMarginPct;
        const input = bidInput.parse({
          styleId: Number(style.id), title: v ? 'Revised after the walk-through' : 'Fence as measured', runs, gates, extras,
          overrides: v === 0 && statuses.length > 1 ? [] : r.chance(0.15) ? [{ key: 'material:CONC-50', qty: null, unitCostCents: 599, note: 'Pallet price from the yard' }] : [],
          target: { mode: 'margin', pct: marginPct, includeTax: true },
          scope: `Supply and install ${runs.reduce((a, x) => a + x.lengthFt, 0)} ft of ${style.name.toLowerCase()}${gates.length ? ` with ${gates.length} gate${gates.length > 1 ? 's' : ''}` : ''}; set posts ${recipe.hole.concrete ? 'in concrete' : 'in tamped earth, without concrete,'} over gravel; clean up the site.`,
        });
        const at = new Date(baseDay.getTime() - (statuses.length - 1 - v) * 2 * DAY);
        const rates = await ratesAt(trx, Number(style.id), style.kind, at);
        const result = computeBid(input, recipe, rates.values, site, book, pricing);
        if ('ok' in result) throw new Error(`demo bid for job ${job.id} failed: ${JSON.stringify(result.fields)}`);
        const decided = job.decided_date ? new Date(`${job.decided_date}T16:00:00Z`) : at;
        const bidId = await insertBid(DEMO.orgId, {
          jobId: Number(job.id), versionNo: v + 1, status, styleId: Number(style.id), styleName: style.name, input, recipe, rates: rates.values,
          rateVersionIds: rates.versionIds, takeoff: result.takeoff, pricing: result.pricing, createdBy: estimator, createdAt: at,
          sentAt: status === 'draft' ? null : at, acceptedAt: status === 'accepted' ? decided : null, acceptedBy: status === 'accepted' ? owner : null,
          declinedAt: status === 'declined' ? decided : null,
        }, trx);
        if (status === 'accepted') await writeEstimates(DEMO.orgId, Number(job.id), bidId, result.pricing.priceCents, result.pricing.costByCategory, trx);
      }

      if (['building', 'completed', 'closed'].includes(job.status) || (job.status === 'won' && r.chance(0.5))) {
        const start = job.start_date ? new Date(`${job.start_date}T12:00:00Z`) : new Date(now.getTime() + 5 * DAY);
        const called = iso(new Date(start.getTime() - r.int(4, 8) * DAY));
        const dates = locateDates(called, rulesFrom(settings).locate);
        const needsPermit = runs.some((x) => x.heightIn > 48 && x.yard !== 'back');
        await trx('job_checklists').insert({
          organization_id: DEMO.orgId, job_id: job.id, locate_ticket_number: `${called.replace(/-/g, '').slice(2)}${String(job.id).padStart(4, '0')}`,
          locate_called_on: called, locate_dig_from: dates.digFrom, locate_expires_on: dates.expiresOn,
          permit_required: needsPermit ? 'yes' : 'no', permit_number: needsPermit ? `FP-${String(job.id).padStart(5, '0')}` : null,
          hoa_required: false, property_line_confirmed: true, property_line_note: 'Owner pointed out the survey pins.', updated_by: estimator,
        });
      }
    }
  });
}

