import Papa from 'papaparse';
import type { Client } from './client';
import { DEFAULT_RECIPES } from '../../src/lib/takeoff/defaults';
import { recipeSkus } from '../../src/lib/takeoff/recipe';

/** A price book for every item the default recipes use, as CSV (cost grows with the row, in cents). */
export function defaultPriceBookCsv(skip: string[] = []): string {
  const seen = new Set<string>();
  const rows: string[][] = [];
  Object.values(DEFAULT_RECIPES).forEach((r) => recipeSkus(r).forEach(({ sku, label }) => {
    if (seen.has(sku) || skip.includes(sku)) return;
    seen.add(sku);
    const rental = sku.startsWith('RENT-');
    rows.push([sku, label, rental ? 'rental' : 'material', rental ? 'day' : 'each', ((300 + rows.length * 97) / 100).toFixed(2), rental ? 'Test Rental Co' : 'Test Yard', '2026-11-20', 'yes', '']);
  }));
  return Papa.unparse([['sku', 'name', 'category', 'unit', 'unit_cost', 'supplier', 'last_seen_on', 'active', 'notes'], ...rows]);
}

export async function importPriceBook(client: Client, csv = defaultPriceBookCsv()) {
  const r = await client.post('/api/pricebook/import', { csv, fileName: 'test.csv' });
  if (r.status !== 200) throw new Error(`import failed: ${r.status} ${r.text.slice(0, 300)}`);
  return r.body;
}

export async function styleId(client: Client, kind = 'wood_privacy'): Promise<number> {
  const r = await client.get('/api/styles?full=1');
  return r.body.items.find((s: { kind: string }) => s.kind === kind).id;
}

/** Two connected runs and a gate, as the builder sends them. */
export function twoRunsAndAGate(style: number, extra: Record<string, unknown> = {}) {
  return {
    styleId: style,
    runs: [{ lengthFt: 40, heightIn: 72, label: 'Back' }, { lengthFt: 30, heightIn: 72, headingDeg: 90, connectsToPrevious: true, yard: 'side' }],
    gates: [{ runIndex: 1, widthFt: 4 }],
    extras: [{ category: 'permit', description: 'Fence permit', amountCents: 7500 }],
    target: { mode: 'margin', pct: 30 },
    ...extra,
  };
}

/** Puts a locate ticket called in today on a job, so it may move to building. */
export async function readyToBuild(client: Client, jobId: number) {
  const r = await client.patch(`/api/jobs/${jobId}/checklist`, { locateTicketNumber: `T-${jobId}`, locateCalledOn: new Date().toISOString().slice(0, 10) });
  if (r.status !== 200) throw new Error(`checklist failed: ${r.status} ${r.text.slice(0, 200)}`);
  return r.body;
}
