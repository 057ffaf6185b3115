import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { COST_CATEGORY_LABELS } from '../../lib/costs/categories.ts';
import { COST_KIND_LABELS, type CostListQuery, type CostRow, type ManualCostInput } from '../../lib/costs/schema.ts';
import { centsText, csvLine, csvRow, toCsv, type CsvColumn } from '../../lib/csv/write.ts';
import * as costs from '../repos/costs.ts';
import { findJob } from '../repos/jobs.ts';
import { findSupplier } from '../repos/suppliers.ts';
import { audit } from '../repos/audit.ts';

export const listCosts = (actor: Actor, query: CostListQuery) => costs.listCosts(actor.companyId, query);

const EXPORT_COLUMNS: CsvColumn<CostRow>[] = [
  { header: 'Date', type: 'text', value: (r) => r.date },
  { header: 'Job', type: 'text', value: (r) => r.jobCode ?? (r.overhead ? 'Overhead' : 'Unmatched') },
  { header: 'Category', type: 'text', value: (r) => COST_CATEGORY_LABELS[r.category] },
  { header: 'Source', type: 'text', value: (r) => COST_KIND_LABELS[r.kind] },
  { header: 'Supplier', type: 'text', value: (r) => r.supplierName },
  { header: 'Description', type: 'text', value: (r) => r.description },
  { header: 'Quantity', type: 'number', value: (r) => r.quantity },
  { header: 'Unit', type: 'text', value: (r) => r.unit },
  { header: 'Amount', type: 'number', value: (r) => centsText(r.amountCents) },
  { header: 'Import', type: 'number', value: (r) => r.importId },
  { header: 'Row', type: 'number', value: (r) => r.rowNumber },
];

/**
 * The filtered cost lines as CSV, page by page, with a total row that matches the screen.
 * Text cells a spreadsheet would run as formulas are neutralised (lib/text.ts).
 */
export async function exportCosts(actor: Actor, query: CostListQuery, today: string): Promise<Response> {
  const pages = costs.eachCost(actor.companyId, query);
  const enc = new TextEncoder();
  let total = 0;
  let started = false;
  const body = new ReadableStream<Uint8Array>({
    async pull(ctrl) {
      if (!started) { started = true; ctrl.enqueue(enc.encode(toCsv(EXPORT_COLUMNS, []))); return; }
      let next: IteratorResult<CostRow[]>;
      try { next = await pages.next(); } catch (err) { console.error('[costs] export failed', err); ctrl.error(err); return; }
      if (next.done) {
        ctrl.enqueue(enc.encode(csvLine(EXPORT_COLUMNS.map((c) => (c.header === 'Description' ? 'Total' : c.header === 'Amount' ? centsText(total) : '')))));
        ctrl.close();
        return;
      }
      let text = '';
      for (const r of next.value) { total += r.amountCents; text += csvRow(EXPORT_COLUMNS, r); }
      ctrl.enqueue(enc.encode(text));
    },
  });
  return new Response(body, {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="tallypost-costs-${today}.csv"`,
      'cache-control': 'no-store',
    },
  });
}

async function checkRefs(actor: Actor, input: Partial<ManualCostInput>): Promise<void> {
  const fields: Record<string, string> = {};
  if (input.jobId != null && !(await findJob(actor.companyId, input.jobId))) fields.jobId = 'Choose a job of this company.';
  if (input.supplierId != null && !(await findSupplier(actor.companyId, input.supplierId))) fields.supplierId = 'Choose a supplier of this company.';
  if (Object.keys(fields).length) throw new AppError('BAD_INPUT', 'Some fields need attention.', fields);
}

function row(input: ManualCostInput) {
  return {
    job_id: input.overhead ? null : input.jobId,
    overhead: input.overhead,
    category: input.category,
    cost_date: input.date,
    description: input.description,
    supplier_id: input.supplierId,
    amount_cents: input.amountCents,
  };
}

export async function createManualCost(actor: Actor, input: ManualCostInput) {
  await checkRefs(actor, input);
  const id = await db().transaction(async (trx) => {
    const [newId] = await trx('cost_lines').insert({ organization_id: actor.companyId, source: 'manual', created_by: actor.userId, ...row(input) });
    await audit(trx, actor, 'cost_line', newId, 'create', { amountCents: input.amountCents, jobId: input.jobId });
    return Number(newId);
  });
  return manualCost(actor, id);
}

export async function manualCost(actor: Actor, id: number) {
  const r = await costs.findManualCost(actor.companyId, id);
  if (!r) throw notFound('That cost');
  return {
    id: Number(r.id),
    jobId: r.job_id == null ? null : Number(r.job_id),
    overhead: Boolean(r.overhead),
    category: r.category,
    date: r.cost_date,
    description: r.description,
    supplierId: r.supplier_id == null ? null : Number(r.supplier_id),
    amountCents: Number(r.amount_cents),
  };
}

export async function updateManualCost(actor: Actor, id: number, input: ManualCostInput) {
  await manualCost(actor, id);
  await checkRefs(actor, input);
  await db().transaction(async (trx) => {
    await trx('cost_lines').where({ organization_id: actor.companyId, id, source: 'manual' }).update({ ...row(input), updated_at: trx.fn.now(3) });
    await audit(trx, actor, 'cost_line', id, 'update', { amountCents: input.amountCents });
  });
  return manualCost(actor, id);
}

export async function deleteManualCost(actor: Actor, id: number): Promise<void> {
  const c = await manualCost(actor, id);
  await db().transaction(async (trx) => {
    await trx('cost_lines').where({ organization_id: actor.companyId, id, source: 'manual' }).delete();
    await audit(trx, actor, 'cost_line', id, 'delete', c);
  });
}

/** Jobs a cost can go on, newest first: everything but lost bids. */
export async function jobOptions(actor: Actor): Promise<{ id: number; code: string; title: string }[]> {
  const rows = await db()('jobs').where('organization_id', actor.companyId).whereNot('status', 'lost').orderBy('code', 'desc').limit(1000).select('id', 'code', 'title');
  return rows.map((r) => ({ id: Number(r.id), code: r.code, title: r.title }));
}
