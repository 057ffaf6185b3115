import type { Knex } from 'knex';
import { AppError } from '../../lib/errors.ts';
import { headerSignature } from '../../lib/csv/mapping.ts';
import type { CommitSummary } from '../../lib/csv/imports.ts';
import { labourCostCents } from '../../lib/labour/cost.ts';
import { formatMoney } from '../../lib/format.ts';
import * as imports from '../repos/imports.ts';
import { ensureSupplier } from '../repos/suppliers.ts';
import { getSettings } from '../repos/settings.ts';
import { insertTimeEntries } from '../repos/time-entries.ts';
import { audit } from '../repos/audit.ts';
import { toInt } from '../db.ts';
import type { Actor } from '../http.ts';
import { sha256 } from './import-preview.ts';
import { applyPriceFeedback, type PriceSighting } from './price-feedback.ts';

const BATCH = 1000;

export interface CommitOptions {
  allOrNothing: boolean;
  saveMapping: boolean;
}

/**
 * Commits a previewed import in one transaction: every good line not already imported becomes
 * a cost (receipts) or a time entry (timesheets), duplicates are marked and left out, the
 * suppliers named are created when missing, the price book hears the material prices, and
 * the mapping is saved for the supplier. A line committed by a concurrent import makes this
 * one retry once, after which it is a duplicate.
 */
export async function commitImportWith(k: Knex, actor: Actor, importId: number, opts: CommitOptions): Promise<CommitSummary> {
  try {
    return await k.transaction((trx) => oneAtATime(trx, actor, () => commitOnce(trx, actor, importId, opts)));
  } catch (err) {
    if ((err as { code?: string }).code !== 'ER_DUP_ENTRY') throw err;
    return k.transaction((trx) => oneAtATime(trx, actor, () => commitOnce(trx, actor, importId, opts)));
  }
}

/**
 * One import commit at a time per company, across app processes (a MariaDB named lock).
 * Each commit raises many jobs' cost totals (job_cost_totals, by trigger) in file order; two
 * at once could take those rows in opposite orders and deadlock. The lock is let go just
 * before COMMIT: the next commit may start, and this one asks for no new rows after that.
 */
async function oneAtATime<T>(trx: Knex.Transaction, actor: Actor, work: () => Promise<T>): Promise<T> {
  const name = `tallypost:import-commit:${actor.companyId}`;
  const [[row]] = (await trx.raw('SELECT GET_LOCK(?, 60) AS got', [name])) as unknown as [[{ got: number | null }]];
  if (Number(row?.got) !== 1) throw new AppError('CONFLICT', 'Another import is being committed for this company. Try again in a minute.');
  try {
    return await work();
  } finally {
    await trx.raw('SELECT RELEASE_LOCK(?)', [name]);
  }
}

async function commitOnce(trx: Knex.Transaction, actor: Actor, importId: number, opts: CommitOptions): Promise<CommitSummary> {
  const companyId = actor.companyId;
  const imp = await imports.findImport(companyId, importId, trx, { forUpdate: true });
  if (!imp || imp.status === 'uploading' || imp.status === 'discarded') throw new AppError('NOT_FOUND', 'That import was not found.');
  if (imp.status === 'committed') throw new AppError('CONFLICT', `Import #${importId} is already committed.`);
  const problems = (imp.summary.mappingProblems ?? {}) as Record<string, string>;
  if (Object.keys(problems).length) throw new AppError('RULE_BROKEN', 'Map the columns before committing.', problems);
  const before = await imports.countLines(companyId, importId, trx);
  const errors = before.byState.error ?? 0;
  if (opts.allOrNothing && errors > 0) {
    const first = await trx('import_lines').where({ organization_id: companyId, import_id: importId, state: 'error' }).orderBy('row_number').limit(5).select('row_number', 'reason');
    throw new AppError('RULE_BROKEN', `${errors} row${errors === 1 ? ' has' : 's have'} errors, so nothing was committed (all or nothing). First: ${first.map((r) => `row ${r.row_number}: ${r.reason}`).join('; ')}`);
  }
  const duplicateFile = await imports.committedWithHash(companyId, imp.fileSha256, importId, trx);

  let supplierId = imp.supplierId;
  const pending = (imp.summary.pendingSupplier as string | null) ?? null;
  if (!supplierId && pending) supplierId = (await ensureSupplier(companyId, pending, trx)).id;
  if (imp.kind === 'receipts') {
    // The preview already gave lines the supplier chosen at upload; one named at upload and
    // created just now is written onto them here.
    if (supplierId && supplierId !== imp.supplierId) await trx('import_lines').where({ organization_id: companyId, import_id: importId }).whereNull('supplier_name').update({ supplier_id: supplierId });
    // Suppliers named line by line, when the file has a supplier column.
    const named = imp.mapping?.columns?.supplier
      ? await trx('import_lines').where({ organization_id: companyId, import_id: importId, state: 'ok' }).whereNotNull('supplier_name').distinct('supplier_name')
      : [];
    for (const { supplier_name: name } of named) {
      const s = await ensureSupplier(companyId, name, trx);
      await trx('import_lines').where({ organization_id: companyId, import_id: importId, supplier_name: name }).update({ supplier_id: s.id });
    }
  }
  const burdenPct = imp.kind === 'timesheet' ? Number((await getSettings(companyId, trx)).labourBurdenPct) : 0;

  // Lines the preview already found imported count as duplicates along with any found now.
  let added = 0, duplicates = before.byState.duplicate ?? 0, addedCents = 0, matched = 0, priceBookUpdates = 0;
  if (imp.kind === 'receipts') {
    const r = await commitReceiptLines(trx, actor, importId);
    added = r.added; duplicates += r.duplicates; addedCents = r.addedCents; matched = r.matched; priceBookUpdates = r.priceBookUpdates;
  }
  let lastId = 0;
  for (;;) {
    if (imp.kind === 'receipts') break;
    const rows = await trx('import_lines')
      .where({ organization_id: companyId, import_id: importId, state: 'ok' })
      .andWhere('id', '>', lastId)
      .orderBy('id')
      .limit(BATCH);
    if (!rows.length) break;
    lastId = Number(rows[rows.length - 1].id);
    // Always line by line, even for a file committed before: rows that were errors then and
    // are fixed in this preview are new lines; the file hash only changes the message.
    const prior = await imports.committedKeys(companyId, rows.map((r) => r.line_key), trx);
    const dup = rows.filter((r) => prior.has(r.line_key));
    const fresh = rows.filter((r) => !prior.has(r.line_key));
    if (dup.length) {
      await trx.raw(
        `UPDATE import_lines l JOIN import_lines p ON p.organization_id = l.organization_id AND p.dedupe_key = l.line_key
         SET l.state = 'duplicate', l.reason = CONCAT('already imported: import #', p.import_id, ', row ', p.\`row_number\`)
         WHERE l.organization_id = ? AND l.id IN (${dup.map(() => '?').join(',')})`,
        [companyId, ...dup.map((r) => r.id)],
      );
    }
    duplicates += dup.length;
    if (!fresh.length) continue;
    const ids = fresh.map((r) => Number(r.id));
    await trx('import_lines').where('organization_id', companyId).whereIn('id', ids).update({ state: 'committed', dedupe_key: trx.raw('line_key') });
    added += fresh.length;
    matched += fresh.filter((r) => r.matched_job_id !== null).length;
    const wages = new Map((await trx('workers').where('organization_id', companyId).whereIn('id', [...new Set(fresh.map((r) => Number(r.worker_id)))]).select('id', 'wage_cents')).map((w) => [Number(w.id), Number(w.wage_cents)]));
    const entries = fresh.map((r) => {
      const wageCents = wages.get(Number(r.worker_id)) ?? 0;
      const hours = Number(r.hours);
      return {
        jobId: Number(r.matched_job_id),
        workerId: Number(r.worker_id),
        date: r.line_date as string,
        hours,
        task: r.task,
        notes: r.memo,
        wageCents,
        burdenPct,
        costCents: labourCostCents({ hours, wageCents, burdenPct }),
        enteredBy: actor.userId || null,
        importLineId: Number(r.id),
      };
    });
    await insertTimeEntries(companyId, entries, trx);
    addedCents += entries.reduce((a, e) => a + e.costCents, 0);
  }

  const headers = imp.headers ?? [];
  if (opts.saveMapping && imp.mapping && added + duplicates > 0) {
    await imports.saveMapping(companyId, {
      kind: imp.kind,
      supplierId,
      key: supplierId ? `s:${supplierId}` : `h:${sha256(headerSignature(headers)).slice(0, 40)}`,
      mapping: imp.mapping,
      headers,
      headerSignature: headerSignature(headers),
      userId: actor.userId,
    }, trx);
  }
  const summary: CommitSummary = {
    added,
    duplicates,
    addedCents,
    errorsLeftOut: errors,
    matched,
    unmatched: imp.kind === 'receipts' ? added - matched : 0,
    priceBookUpdates,
    message: message(imp.kind, { added, duplicates, addedCents, errors, duplicateFile }),
  };
  await imports.updateImport(companyId, importId, { status: 'committed', supplier_id: supplierId, committed_by: actor.userId, committed_at: new Date(), commit_summary: summary }, trx);
  await audit(trx, actor, 'import', importId, 'commit', { added, duplicates, addedCents });
  return summary;
}

/**
 * Receipt lines, committed inside the database: the lines already imported (by this import's
 * keys) are marked duplicates, the rest become cost lines with one INSERT ... SELECT and are
 * marked committed, their keys now taken. Only the matched material lines priced from the price
 * book come back to the app, for price feedback.
 */
async function commitReceiptLines(trx: Knex.Transaction, actor: Actor, importId: number) {
  const companyId = actor.companyId;
  const [dupResult] = (await trx.raw(
    `UPDATE import_lines l JOIN import_lines p ON p.organization_id = l.organization_id AND p.dedupe_key = l.line_key
     SET l.state = 'duplicate', l.reason = CONCAT('already imported: import #', p.import_id, ', row ', p.\`row_number\`)
     WHERE l.organization_id = ? AND l.import_id = ? AND l.state = 'ok'`,
    [companyId, importId],
  )) as unknown as [{ affectedRows: number }];
  const [[sums]] = (await trx.raw(
    `SELECT COUNT(*) AS n, COALESCE(SUM(total_cents), 0) AS cents, COALESCE(SUM(matched_job_id IS NOT NULL), 0) AS matched
       FROM import_lines WHERE organization_id = ? AND import_id = ? AND state = 'ok'`,
    [companyId, importId],
  )) as unknown as [[{ n: number; cents: number | string; matched: number | string }]];
  await trx.raw(
    `INSERT INTO cost_lines (organization_id, source, import_line_id, job_id, overhead, category, cost_date, supplier_id,
                             description, sku, quantity, unit, amount_cents, price_book_item_id, created_by)
     SELECT organization_id, 'receipt', id, matched_job_id, FALSE, category, line_date, supplier_id,
            description, sku, quantity, unit, total_cents, price_book_item_id, ?
       FROM import_lines WHERE organization_id = ? AND import_id = ? AND state = 'ok'`,
    [actor.userId || null, companyId, importId],
  );
  await trx.raw(
    `UPDATE import_lines SET state = 'committed', dedupe_key = line_key, allocation = IF(matched_job_id IS NULL, 'unmatched', 'job')
      WHERE organization_id = ? AND import_id = ? AND state = 'ok'`,
    [companyId, importId],
  );
  const priced = await trx('import_lines')
    .where({ organization_id: companyId, import_id: importId, state: 'committed', category: 'material' })
    .whereNotNull('matched_job_id').whereNotNull('price_book_item_id').whereNotNull('unit_price_cents').andWhere('quantity', '>', 0)
    .select('id', 'matched_job_id', 'category', 'price_book_item_id', 'unit_price_cents', 'quantity', 'supplier_id', 'line_date');
  return {
    added: Number(sums.n),
    duplicates: Number(dupResult.affectedRows ?? 0),
    addedCents: toInt(sums.cents),
    matched: Number(sums.matched),
    priceBookUpdates: await applyPriceFeedback(trx, actor, priced.flatMap((r) => sighting(r, importId))),
  };
}

function sighting(r: Record<string, unknown>, importId: number): PriceSighting[] {
  const qty = Number(r.quantity);
  if (r.matched_job_id === null || r.category !== 'material' || r.price_book_item_id === null || r.unit_price_cents === null || !(qty > 0)) return [];
  return [{ lineId: Number(r.id), importId, itemId: Number(r.price_book_item_id), unitCostCents: Number(r.unit_price_cents), supplierId: r.supplier_id == null ? null : Number(r.supplier_id), date: r.line_date as string }];
}

function message(kind: string, s: { added: number; duplicates: number; addedCents: number; errors: number; duplicateFile: { id: number; committedAt: string } | null }): string {
  const what = kind === 'receipts' ? (s.added === 1 ? 'line' : 'lines') : s.added === 1 ? 'time entry' : 'time entries';
  if (s.duplicateFile && !s.added) return `This file was already imported as import #${s.duplicateFile.id}; nothing was added.`;
  const parts = [`Added ${s.added.toLocaleString('en-US')} ${what} (${formatMoney(s.addedCents)})`];
  if (s.duplicates) parts.push(`${s.duplicates} already imported and left out`);
  if (s.errors) parts.push(`${s.errors} row${s.errors === 1 ? '' : 's'} with errors left out`);
  if (!s.added && s.duplicates) return `Nothing was added: all ${s.duplicates} line${s.duplicates === 1 ? ' was' : 's were'} already imported.`;
  const again = s.duplicateFile ? `This file was already imported as import #${s.duplicateFile.id}; only rows not imported then were added. ` : '';
  return `${again}${parts.join('; ')}.`;
}
