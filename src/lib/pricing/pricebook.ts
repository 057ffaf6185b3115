import { z } from 'zod';
import { patchOf } from '../patch.ts';
import { COST_CATEGORIES, type CostCategory } from '../costs/categories.ts';
import { isIsoDate } from '../checklist/business-days.ts';
import { neutraliseCsvCell } from '../text.ts';

/** "$1,234.5" → 123450 cents, exactly (no floating point); null when it is not an amount. */
export function parseDollars(text: string): number | null {
  const t = text.trim().replace(/^\$/, '').replace(/,/g, '');
  const m = /^(\d{1,10})(?:\.(\d{1,2}))?$/.exec(t);
  if (!m) return null;
  return Number(m[1]) * 100 + Number((m[2] ?? '').padEnd(2, '0'));
}

/** 123450 → "1234.50" for CSV and inputs. */
export const centsToDollars = (cents: number): string => `${Math.trunc(cents / 100)}.${String(Math.abs(cents) % 100).padStart(2, '0')}`;

const optionalText = (max: number) => z.string().trim().max(max, `At most ${max} characters.`).nullish().transform((v) => (v ? v : null));

export const priceItemInput = z.strictObject({
  sku: z.string().trim().min(1, 'Give the item code.').max(80, 'At most 80 characters.').regex(/^[A-Za-z0-9][A-Za-z0-9._\-/]*$/, 'Letters, digits and . _ - / only.'),
  name: z.string().trim().min(1, 'Name the item.').max(200, 'At most 200 characters.'),
  category: z.enum(COST_CATEGORIES, { message: 'Choose a category.' }),
  unit: z.string().trim().min(1, 'Give the unit, e.g. each, bag, roll, day.').max(20, 'At most 20 characters.'),
  unitCostCents: z.number({ message: 'Enter the unit cost.' }).int('Whole cents only.').min(0, 'Cannot be negative.').max(100_000_000, 'Too large.'),
  supplierName: optionalText(160),
  lastSeenOn: z.string().trim().nullish().transform((v) => (v ? v : null)).refine((v) => v === null || isIsoDate(v), 'Use a date such as 2026-05-14.'),
  active: z.boolean().default(true),
  notes: optionalText(2000),
});
export type PriceItemInput = z.output<typeof priceItemInput>;
export const priceItemPatch = patchOf(priceItemInput);

export const PRICEBOOK_SORTS = ['sku', 'name', 'category', 'unit', 'unitCost', 'supplier', 'lastSeen'] as const;
export const priceBookQuery = z.strictObject({
  q: z.string().trim().max(100).optional(),
  category: z.enum(COST_CATEGORIES).optional(),
  active: z.enum(['all', 'active', 'inactive']).default('active'),
  sort: z.enum(PRICEBOOK_SORTS).default('sku'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  page: z.coerce.number().int().min(1).max(100000).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
});
export type PriceBookQuery = z.output<typeof priceBookQuery>;

export interface PriceBookItem {
  id: number;
  sku: string;
  name: string;
  category: CostCategory;
  unit: string;
  unitCostCents: number;
  supplierId: number | null;
  supplierName: string | null;
  lastSeenOn: string | null;
  active: boolean;
  notes: string | null;
  updatedAt: string;
}

export const CSV_COLUMNS = ['sku', 'name', 'category', 'unit', 'unit_cost', 'supplier', 'last_seen_on', 'active', 'notes'] as const;

/** Parsed rows of a price-book CSV (header row already mapped to objects), or field errors by row. */
export function parsePriceBookRows(rows: Record<string, string>[]): { items: PriceItemInput[]; fields: Record<string, string> } {
  const fields: Record<string, string> = {};
  const items: PriceItemInput[] = [];
  const seen = new Map<string, number>();
  rows.forEach((raw, i) => {
    const n = i + 2; // the header is line 1
    const get = (k: string) => (raw[k] ?? '').trim();
    const cost = parseDollars(get('unit_cost'));
    if (cost === null) { fields[`rows.${n}.unit_cost`] = `Line ${n}: "${get('unit_cost')}" is not an amount such as 12.34.`; return; }
    const activeText = get('active').toLowerCase();
    const parsed = priceItemInput.safeParse({
      sku: get('sku'), name: get('name'), category: get('category').toLowerCase() || 'material', unit: get('unit'), unitCostCents: cost,
      supplierName: get('supplier'), lastSeenOn: get('last_seen_on'), active: !['no', 'false', '0', 'n'].includes(activeText), notes: get('notes'),
    });
    if (!parsed.success) {
      for (const issue of parsed.error.issues) fields[`rows.${n}.${String(issue.path[0] ?? '_')}`] ??= `Line ${n}: ${issue.message}`;
      return;
    }
    const key = parsed.data.sku.toUpperCase();
    if (seen.has(key)) { fields[`rows.${n}.sku`] = `Line ${n}: ${parsed.data.sku} is also on line ${seen.get(key)}.`; return; }
    seen.set(key, n);
    items.push(parsed.data);
  });
  return { items, fields };
}

/** The price book as CSV rows, every text cell neutralised against spreadsheet formulas. */
export function priceBookCsvRows(items: readonly PriceBookItem[]): string[][] {
  return [
    [...CSV_COLUMNS],
    ...items.map((it) => [
      it.sku, it.name, it.category, it.unit, centsToDollars(it.unitCostCents), it.supplierName ?? '', it.lastSeenOn ?? '', it.active ? 'yes' : 'no', it.notes ?? '',
    ].map(neutraliseCsvCell)),
  ];
}
