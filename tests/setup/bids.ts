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

/** Ids for the permission matrix: a job assigned to the crew lead, with a price book and a bid. */
export const BIDS_FIXTURES: Record<string, { params: (co: import('./factory').TestCompany) => Promise<Record<string, string>> }> = (() => {
  const priced = new WeakSet<object>();
  const ensurePriceBook = async (co: import('./factory').TestCompany) => {
    if (priced.has(co)) return;
    await importPriceBook(co.owner);
    priced.add(co);
  };
  const job = async (co: import('./factory').TestCompany) => {
    const { makeCustomer, makeJob } = await import('./factory');
    const c = await makeCustomer(co.owner);
    return (await makeJob(co.owner, c.id, { crewLeadUserId: co.userIds.crew_lead })).id;
  };
  const bid = async (co: import('./factory').TestCompany) => {
    await ensurePriceBook(co);
    const id = await job(co);
    const b = await co.owner.post(`/api/jobs/${id}/bids`, twoRunsAndAGate(await styleId(co.owner)));
    if (b.status !== 201) throw new Error(`bid fixture: ${b.status} ${b.text.slice(0, 200)}`);
    return { id: String(id), bidId: String(b.body.id) };
  };
  const jobOnly = { params: async (co: import('./factory').TestCompany) => ({ id: String(await job(co)) }) };
  const style = { params: async (co: import('./factory').TestCompany) => ({ id: String(await styleId(co.owner)), styleId: String(await styleId(co.owner)) }) };
  return {
    '/api/jobs/[id]/bids': jobOnly,
    '/api/jobs/[id]/checklist': jobOnly,
    '/api/jobs/[id]/checklist-override': jobOnly,
    '/api/jobs/[id]/bids/[bidId]': { params: bid },
    '/api/jobs/[id]/bids/[bidId]/accept': { params: bid },
    '/api/pricebook/[id]': {
      params: async (co) => {
        await ensurePriceBook(co);
        const list = await co.owner.get('/api/pricebook?pageSize=1');
        return { id: String(list.body.items[0].id) };
      },
    },
    '/api/styles/[id]': style,
    '/api/rates/[styleId]': style,
  };
})();
