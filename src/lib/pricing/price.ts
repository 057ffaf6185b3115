import { z } from 'zod';
import { COST_CATEGORIES, type CostCategory } from '../costs/categories.ts';
import type { Takeoff } from '../takeoff/takeoff.ts';
import { LABOUR_TASK_LABELS } from '../takeoff/rates.ts';
import type { Rates } from '../takeoff/rates.ts';
import { roundTo } from '../units.ts';
import { marginPct, markupPct, mulCents, priceForMargin, priceForMarkup, roundToStep, sumCents } from './money.ts';

/** A price-book item as pricing sees it. */
export interface PriceItem {
  itemId: number;
  sku: string;
  name: string;
  unit: string;
  category: CostCategory;
  unitCostCents: number;
  supplierName: string | null;
  /** YYYY-MM-DD */
  lastSeenOn: string | null;
}

export interface PricingSettings {
  labourBurdenPct: number;
  taxMode: 'none' | 'materials' | 'all';
  taxRatePct: number;
  bidRoundingCents: number;
}

const cents = z.number({ message: 'Enter an amount.' }).int('Whole cents only.').min(0, 'Cannot be negative.').max(100_000_000_00, 'Too large.');

export const extraLine = z.strictObject({
  category: z.enum(COST_CATEGORIES),
  description: z.string().trim().min(1, 'Describe the line.').max(200),
  amountCents: cents,
});
export type ExtraLine = z.output<typeof extraLine>;

export const lineOverride = z.strictObject({
  key: z.string().min(1).max(120),
  qty: z.number().min(0, 'Cannot be negative.').max(1_000_000).nullable().default(null),
  unitCostCents: cents.nullable().default(null),
  note: z.string().trim().max(200).default(''),
});
export type LineOverride = z.output<typeof lineOverride>;

export const pricingTarget = z.strictObject({
  mode: z.enum(['margin', 'markup']),
  /** percent */
  pct: z.number({ message: 'Enter a percentage.' }).min(0, 'Cannot be negative.').max(500, 'At most 500 %.'),
  includeTax: z.boolean().default(true),
}).refine((t) => t.mode !== 'margin' || t.pct < 95, { path: ['pct'], message: 'A margin must be under 95 %.' });
export type PricingTarget = z.output<typeof pricingTarget>;

export interface PricedLine {
  key: string;
  category: CostCategory;
  kind: 'material' | 'labour' | 'rental' | 'extra';
  description: string;
  sku: string | null;
  unit: string;
  qty: number;
  unitCostCents: number;
  amountCents: number;
  /** false when the price book has no price for it */
  priced: boolean;
  overridden: boolean;
  /** what the takeoff and the price book gave, kept beside a hand override */
  original: { qty: number; unitCostCents: number; amountCents: number } | null;
  note: string;
  itemId: number | null;
  supplierName: string | null;
  lastSeenOn: string | null;
  /** material lines: quantity before waste and the waste added */
  takeoffQty: number | null;
  wastePct: number | null;
  /** what the takeoff says of the quantity (e.g. spare pieces bought for waste) */
  detail?: string;
}

export interface Pricing {
  lines: PricedLine[];
  costByCategory: Record<CostCategory, number>;
  costCents: number;
  target: PricingTarget;
  /** step 1: cost ÷ (1 − margin) or cost × (1 + markup), half up to the cent */
  exactPriceCents: number;
  /** step 2: to the company's bid rounding */
  priceCents: number;
  marginPct: number | null;
  markupPct: number | null;
  /** step 3: sales tax on the taxable base, half away from zero to the cent */
  taxableCents: number;
  taxCents: number;
  totalCents: number;
  warnings: string[];
}

/** Loaded labour rate: wage × (1 + burden), half away from zero to the cent. */
export const loadedWageCents = (wageCents: number, burdenPct: number): number => mulCents(wageCents, 1 + burdenPct / 100);

/**
 * Prices a takeoff: quantities × price-book unit costs, labour hours × loaded wage,
 * rental days × day rates, plus the extra lines; then to the target margin or markup,
 * the company's bid rounding and sales tax. Hand overrides replace a line's quantity or
 * unit cost and keep what it was.
 */
export function priceTakeoff(
  takeoff: Takeoff,
  book: ReadonlyMap<string, PriceItem>,
  rates: Rates,
  settings: PricingSettings,
  target: PricingTarget,
  extras: readonly ExtraLine[] = [],
  overrides: readonly LineOverride[] = [],
): Pricing {
  const warnings: string[] = [];
  const lines: PricedLine[] = [];
  const byKey = new Map(overrides.map((o) => [o.key, o]));

  const push = (l: Omit<PricedLine, 'amountCents' | 'overridden' | 'original' | 'note'>) => {
    // Line amount: quantity × unit cost, half away from zero to the cent.
    const amount = mulCents(l.unitCostCents, l.qty);
    const o = byKey.get(l.key);
    if (o && (o.qty !== null || o.unitCostCents !== null)) {
      const qty = o.qty ?? l.qty;
      const unitCostCents = o.unitCostCents ?? l.unitCostCents;
      lines.push({ ...l, qty, unitCostCents, priced: l.priced || o.unitCostCents !== null, amountCents: mulCents(unitCostCents, qty), overridden: true, original: { qty: l.qty, unitCostCents: l.unitCostCents, amountCents: amount }, note: o.note });
    } else lines.push({ ...l, amountCents: amount, overridden: false, original: null, note: '' });
  };

  const item = (sku: string, label: string) => {
    const it = book.get(sku);
    if (!it) warnings.push(`No price for ${label} (${sku}) in the price book.`);
    return it;
  };

  for (const m of takeoff.materials) {
    if (m.buyQty <= 0) continue;
    const it = item(m.sku, m.label);
    push({
      key: `material:${m.sku}`, category: it?.category ?? 'material', kind: 'material', description: it?.name ?? m.label, sku: m.sku, unit: it?.unit ?? m.unit,
      qty: m.buyQty, unitCostCents: it?.unitCostCents ?? 0, priced: Boolean(it), itemId: it?.itemId ?? null, supplierName: it?.supplierName ?? null,
      lastSeenOn: it?.lastSeenOn ?? null, takeoffQty: m.takeoffQty, wastePct: m.wastePct, ...(m.note ? { detail: m.note } : {}),
    });
  }
  const loaded = loadedWageCents(rates.crew_wage_cents, settings.labourBurdenPct);
  for (const l of takeoff.labour) {
    if (l.manHours <= 0) continue;
    push({
      key: `labour:${l.task}`, category: 'labour', kind: 'labour', description: `${LABOUR_TASK_LABELS[l.task]} (${roundTo(l.crewHours, 2)} crew-h × ${rates.crew_size})`, sku: null,
      unit: 'person-h', qty: l.manHours, unitCostCents: loaded, priced: true, itemId: null, supplierName: null, lastSeenOn: null, takeoffQty: null, wastePct: null,
    });
  }
  for (const r of takeoff.rentals) {
    const parts: [string | null, number, string][] = [[r.daySku, r.fullDays, 'day'], [r.halfDaySku, r.halfDays, 'half day']];
    for (const [sku, qty, unit] of parts) {
      if (!sku || qty <= 0) continue;
      const it = item(sku, `${r.label}, ${unit}`);
      push({
        key: `rental:${sku}`, category: it?.category ?? 'rental', kind: 'rental', description: it?.name ?? `${r.label}, ${unit}`, sku, unit: it?.unit ?? unit, qty,
        unitCostCents: it?.unitCostCents ?? 0, priced: Boolean(it), itemId: it?.itemId ?? null, supplierName: it?.supplierName ?? null, lastSeenOn: it?.lastSeenOn ?? null, takeoffQty: null, wastePct: null,
      });
    }
  }
  extras.forEach((e, i) => push({
    key: `extra:${i}`, category: e.category, kind: 'extra', description: e.description, sku: null, unit: 'lot', qty: 1, unitCostCents: e.amountCents, priced: true,
    itemId: null, supplierName: null, lastSeenOn: null, takeoffQty: null, wastePct: null,
  }));

  const costByCategory = Object.fromEntries(COST_CATEGORIES.map((c) => [c, sumCents(lines.filter((l) => l.category === c).map((l) => l.amountCents))])) as Record<CostCategory, number>;
  const costCents = sumCents(Object.values(costByCategory));
  const exactPriceCents = target.mode === 'margin' ? priceForMargin(costCents, target.pct) : priceForMarkup(costCents, target.pct);
  const priceCents = roundToStep(exactPriceCents, settings.bidRoundingCents);
  const taxableCents = !target.includeTax || settings.taxMode === 'none' ? 0 : settings.taxMode === 'materials' ? costByCategory.material : priceCents;
  const taxCents = mulCents(taxableCents, settings.taxRatePct / 100);
  return {
    lines, costByCategory, costCents, target, exactPriceCents, priceCents,
    marginPct: marginPct(priceCents, costCents), markupPct: markupPct(priceCents, costCents),
    taxableCents, taxCents, totalCents: priceCents + taxCents, warnings,
  };
}
