import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import type { AllocationInput, ReceiptLineQuery, SplitInput } from '../../lib/costs/schema.ts';
import type { ImportLine } from '../../lib/csv/imports.ts';
import { splitByAmount, splitByPercent } from '../../lib/allocation/split.ts';
import type { CostCategory } from '../../lib/costs/categories.ts';
import { findJob } from '../repos/jobs.ts';
import { audit } from '../repos/audit.ts';
import { lineFromRow, linesQuery, partsOf } from './imports.ts';
import { applyPriceFeedback } from './price-feedback.ts';

const SORTS: Record<ReceiptLineQuery['sort'], string> = { date: 'l.line_date', amount: 'l.total_cents', supplier: 's.name', description: 'l.description', row: 'l.row_number' };

/** Committed receipt lines across imports, by allocation: the bookkeeper's to-do list is 'unmatched'. */
export async function listReceiptLines(actor: Actor, query: ReceiptLineQuery): Promise<{ items: ImportLine[]; total: number; totalCents: number }> {
  const b = linesQuery(db(), actor.companyId).andWhere('l.state', 'committed').whereNotNull('l.allocation');
  if (query.allocation !== 'all') b.andWhere('l.allocation', query.allocation);
  if (query.importId) b.andWhere('l.import_id', query.importId);
  if (query.supplier.length) b.whereIn('l.supplier_id', query.supplier);
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    b.andWhere((w) => w.whereILike('l.description', like).orWhereILike('l.sku', like).orWhereILike('l.memo', like).orWhereILike('l.job_ref', like).orWhereILike('l.receipt_number', like));
  }
  const [agg] = await b.clone().clearSelect().select(db().raw('COUNT(*) AS n, COALESCE(SUM(l.total_cents), 0) AS cents'));
  const rows = await b.orderBy(SORTS[query.sort], query.dir).orderBy('l.id', query.dir).limit(query.pageSize).offset((query.page - 1) * query.pageSize);
  const items = rows.map(lineFromRow);
  const parts = await partsOf(actor.companyId, items.map((i) => i.id));
  for (const i of items) i.parts = parts.get(i.id) ?? [];
  return { items, total: Number(agg.n), totalCents: toInt(agg.cents) };
}

async function lockLine(trx: Knex.Transaction, actor: Actor, lineId: number) {
  const line = await trx('import_lines as l')
    .join('imports as i', function () { this.on('i.id', 'l.import_id').andOn('i.organization_id', 'l.organization_id'); })
    .where({ 'l.organization_id': actor.companyId, 'l.id': lineId, 'i.kind': 'receipts', 'l.state': 'committed' })
    .forUpdate()
    .first('l.*');
  if (!line) throw notFound('That receipt line');
  return line;
}

interface Part {
  jobId: number | null;
  category: CostCategory;
  amountCents: number;
  splitPct: number | null;
}

/**
 * Rounding step "quantity share": a split part carries the line's quantity × part ÷ line,
 * half away from zero at four decimals (quantities need not sum exactly; money does).
 */
function quantityShare(quantity: string | null, part: number, total: number): string | null {
  if (quantity === null || total === 0) return quantity;
  const v = (Number(quantity) * part) / total;
  return String((Math.sign(v) * Math.round(Math.abs(v) * 10_000)) / 10_000);
}

async function replaceParts(trx: Knex.Transaction, actor: Actor, line: Record<string, unknown>, parts: Part[], allocation: string): Promise<void> {
  const jobIds = [...new Set(parts.map((p) => p.jobId).filter((j): j is number => j !== null))];
  for (const id of jobIds) if (!(await findJob(actor.companyId, id, {}, trx))) throw new AppError('BAD_INPUT', 'Choose a job of this company.', { jobId: 'Choose a job of this company.' });
  const total = toInt(line.total_cents);
  await trx('cost_lines').where({ organization_id: actor.companyId, import_line_id: line.id }).delete();
  await trx('cost_lines').insert(
    parts.map((p) => ({
      organization_id: actor.companyId,
      source: 'receipt',
      import_line_id: line.id,
      job_id: p.jobId,
      overhead: allocation !== 'unmatched' && p.jobId === null,
      category: p.category,
      cost_date: line.line_date,
      supplier_id: line.supplier_id,
      description: line.description,
      sku: line.sku,
      quantity: parts.length === 1 ? line.quantity : quantityShare(line.quantity as string | null, p.amountCents, total),
      unit: line.unit,
      amount_cents: p.amountCents,
      price_book_item_id: line.price_book_item_id,
      split_pct: p.splitPct,
      created_by: actor.userId,
    })),
  );
  await trx('import_lines').where({ organization_id: actor.companyId, id: line.id }).update({ allocation, ...(parts.length === 1 ? { category: parts[0].category } : {}) });
  const material = parts.some((p) => p.jobId !== null && p.category === 'material');
  const qty = Number(line.quantity);
  if (material && line.price_book_item_id != null && line.unit_price_cents != null && qty > 0) {
    await applyPriceFeedback(trx, actor, [{ lineId: Number(line.id), importId: Number(line.import_id), itemId: Number(line.price_book_item_id), unitCostCents: toInt(line.unit_price_cents), supplierId: line.supplier_id == null ? null : Number(line.supplier_id), date: line.line_date as string }]);
  }
  await audit(trx, actor, 'import_line', Number(line.id), 'allocate', { allocation, parts: parts.map((p) => ({ jobId: p.jobId, category: p.category, amountCents: p.amountCents })) });
}

async function lineWithParts(actor: Actor, lineId: number, k: Knex): Promise<ImportLine> {
  const r = await linesQuery(k, actor.companyId).andWhere('l.id', lineId).first();
  const line = lineFromRow(r);
  line.parts = (await partsOf(actor.companyId, [lineId], k)).get(lineId) ?? [];
  return line;
}

/** One line whole to a job and category, to overhead, or back to unmatched. */
export async function allocateLine(actor: Actor, lineId: number, input: AllocationInput, k: Knex = db()): Promise<ImportLine> {
  await k.transaction(async (trx) => {
    const line = await lockLine(trx, actor, lineId);
    const amount = toInt(line.total_cents);
    if (input.mode === 'job') await replaceParts(trx, actor, line, [{ jobId: input.jobId, category: input.category, amountCents: amount, splitPct: null }], 'job');
    else if (input.mode === 'overhead') await replaceParts(trx, actor, line, [{ jobId: null, category: input.category, amountCents: amount, splitPct: null }], 'overhead');
    else await replaceParts(trx, actor, line, [{ jobId: null, category: line.category, amountCents: amount, splitPct: null }], 'unmatched');
  });
  return lineWithParts(actor, lineId, k);
}

/** One line across jobs (or overhead) by amount or percentage; the parts sum to the line exactly. */
export async function splitLine(actor: Actor, lineId: number, input: SplitInput, k: Knex = db()): Promise<ImportLine> {
  await k.transaction(async (trx) => {
    const line = await lockLine(trx, actor, lineId);
    const total = toInt(line.total_cents);
    const r = input.by === 'percent' ? splitByPercent(total, input.parts.map((p) => p.percent!)) : splitByAmount(total, input.parts.map((p) => p.amountCents!));
    if (!r.ok) throw new AppError('RULE_BROKEN', `The split does not work: ${r.reason}.`, { parts: r.reason });
    const parts = input.parts.map((p, i) => ({ jobId: p.jobId, category: p.category, amountCents: r.parts[i], splitPct: input.by === 'percent' ? p.percent! : null }));
    await replaceParts(trx, actor, line, parts, 'split');
  });
  return lineWithParts(actor, lineId, k);
}
