import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { AppError, notFound } from '../../lib/errors.ts';
import { computeInvoice, displayStatus, formatInvoiceNumber, INVOICE_KIND_LABELS, type InvoiceKind, type InvoiceStatus, type Line, type LineInput, type TaxMode } from '../../lib/billing/invoice.ts';
import { contractLines, depositAmount, depositCap, finalAmount, overContract, progressAmount } from '../../lib/billing/contract.ts';
import { dueDate, termsDays } from '../../lib/billing/terms.ts';
import { formatMoney, formatPct } from '../../lib/format.ts';
import type { InvoiceDraftInput, InvoiceDraftPatch, LineFormInput } from '../../lib/billing/schema.ts';
import * as repo from '../repos/invoices.ts';
import { findChangeOrder, jobContract, listChangeOrders, type JobContract } from '../repos/change-orders.ts';
import { billingSettings, todayIn, type BillingSettings } from '../repos/billing-settings.ts';
import { audit } from '../repos/audit.ts';
import { enqueueMail } from '../mail/outbox.ts';
import { invoiceMail } from './billing-mail.ts';
import { invoiceUrl, newNonce } from './invoice-links.ts';
import { expireStaleCheckoutSessions } from './checkout-sessions.ts';

type Q = Knex | Knex.Transaction;

/** A transaction retried (up to three times) when MariaDB picks it as a deadlock victim. */
export async function tx<T>(fn: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await db().transaction(fn);
    } catch (err) {
      const code = (err as { code?: string }).code;
      if (attempt >= 8 || (code !== 'ER_LOCK_DEADLOCK' && code !== 'ER_LOCK_WAIT_TIMEOUT')) throw err;
      // InnoDB chose this transaction as the deadlock victim: wait a little, longer each
      // time and with jitter so the two sides do not collide again, and run it again.
      await new Promise((r) => setTimeout(r, Math.random() * 15 * attempt));
    }
  }
}

export interface Warning {
  code: 'OVER_CONTRACT' | 'DEPOSIT_OVER_CAP' | 'NO_CONTRACT' | 'NOTHING_TO_BILL' | 'NO_EMAIL';
  message: string;
}

interface JobFacts {
  companyId: string;
  id: number;
  code: string;
  title: string;
  customerId: number;
  commercial: boolean;
  site: string;
}

async function jobFacts(companyId: string, jobId: number, q: Q): Promise<JobFacts | undefined> {
  const r = await q('jobs').where({ organization_id: companyId, id: jobId }).first();
  if (!r) return undefined;
  const site = [r.site_line1, r.site_city, [r.site_region, r.site_postal].filter(Boolean).join(' ')].filter(Boolean).join(', ');
  return { companyId, id: Number(r.id), code: r.code, title: r.title, customerId: Number(r.customer_id), commercial: Boolean(r.commercial), site };
}

interface Recipe {
  kind: InvoiceKind;
  basisPct: number | null;
  requestedCents: number | null;
  retainagePct: number | null;
  extraLines: LineFormInput[];
  changeOrderIds: number[];
}

interface Plan {
  lines: Line[];
  totals: repo.Totals;
  retainagePct: number;
  contract: JobContract;
  billedBeforeCents: number;
  overContractCents: number;
  depositCapCents: number | null;
  depositOverCap: boolean;
  warnings: Warning[];
}

/**
 * Builds an invoice's lines from what was asked (kind, percent, change orders, extra lines)
 * against the job as it stands now, and computes its totals and the limits it would break.
 */
async function plan(q: Q, s: BillingSettings, job: JobFacts, r: Recipe, exceptInvoiceId: number | null): Promise<Plan> {
  const companyId = job.companyId;
  const contract = (await jobContract(companyId, job.id, q))!;
  const billed = await repo.jobBilled(companyId, job.id, exceptInvoiceId, q);
  const warnings: Warning[] = [];
  const lines: LineInput[] = [];
  const needsContract = r.kind !== 'extra';
  if (needsContract && contract.contractCents <= 0) {
    throw new AppError('RULE_BROKEN', 'This job has no contract price yet. Accept a bid (or set the contract) before billing against it.', { kind: 'The job has no contract price.' });
  }
  const estimate = s.taxMode === 'materials' ? await repo.jobEstimateSplit(companyId, job.id, q) : { materialCents: 0, otherCents: 0 };
  const contractLine = (amount: number, description: string) => contractLines({ amountCents: amount, description, taxOnMaterials: s.taxMode === 'materials', estimate });

  if (r.kind === 'deposit') {
    const amount = depositAmount(contract.contractCents, { pct: r.basisPct, cents: r.requestedCents });
    lines.push(...contractLine(amount, r.basisPct !== null ? `Deposit: ${formatPct(r.basisPct, r.basisPct % 1 ? 2 : 0)} of the contract` : 'Deposit on the contract'));
  } else if (r.kind === 'progress') {
    const { earnedCents, billCents } = progressAmount({ contractCents: contract.contractCents, percentComplete: r.basisPct ?? 0, billedBeforeCents: billed.billedBeforeCents });
    if (billCents <= 0) {
      throw new AppError('RULE_BROKEN', `At ${formatPct(r.basisPct, 0)} complete the job has earned ${formatMoney(earnedCents, s.currency)}, and ${formatMoney(billed.billedBeforeCents, s.currency)} is billed already: there is nothing to bill yet.`, { basisPct: 'Nothing to bill at this percent.' });
    }
    lines.push(...contractLine(billCents, `Progress to ${formatPct(r.basisPct, 0)} complete (${formatMoney(earnedCents, s.currency)} earned of ${formatMoney(contract.contractCents, s.currency)}, less ${formatMoney(billed.billedBeforeCents, s.currency)} billed before)`));
  } else if (r.kind === 'final') {
    const f = finalAmount({ contractCents: contract.contractCents, billedBeforeCents: billed.billedBeforeCents, retainageHeldCents: billed.retainageHeldCents, retainageReleasedCents: billed.retainageReleasedCents });
    if (f.balanceCents > 0) lines.push(...contractLine(f.balanceCents, `Balance of the contract (${formatMoney(contract.contractCents, s.currency)} less ${formatMoney(billed.billedBeforeCents, s.currency)} billed before)`));
    if (f.retainageCents > 0) lines.push({ kind: 'retainage_release', category: 'other', description: 'Retainage held on earlier bills, now due', quantity: 1, unitPriceCents: f.retainageCents });
  }

  const taken = await repo.changeOrdersOnOtherInvoices(companyId, r.changeOrderIds, exceptInvoiceId, q);
  for (const coId of r.changeOrderIds) {
    const co = await findChangeOrder(companyId, coId, q);
    if (!co || co.jobId !== job.id) throw new AppError('BAD_INPUT', 'Some fields need attention.', { changeOrderIds: 'Choose change orders of this job.' });
    if (co.status !== 'approved') throw new AppError('RULE_BROKEN', `${co.label} is not approved by the customer yet.`, { changeOrderIds: `${co.label} is not approved.` });
    if (taken.includes(coId)) throw new AppError('CONFLICT', `${co.label} is already on another invoice.`, { changeOrderIds: `${co.label} is already billed.` });
    lines.push({ kind: 'change_order', category: 'other', description: `Change order ${co.label}: ${co.description}`, quantity: 1, unitPriceCents: co.priceCents, changeOrderId: co.id });
  }
  for (const l of r.extraLines) lines.push({ kind: 'extra', category: l.category, description: l.description, quantity: l.quantity, unitPriceCents: l.unitPriceCents, taxable: l.taxable });

  // Retainage is held on progress bills only; the final bill holds none and releases what was held.
  const retainagePct = r.kind === 'progress' ? (r.retainagePct ?? (job.commercial ? s.defaultRetainagePct : 0)) : 0;
  const t = computeInvoice({ lines, taxMode: s.taxMode, taxRatePct: s.taxRatePct, retainagePct, currency: s.currency });
  const overContractCents = overContract({ contractCents: contract.contractCents, billedBeforeCents: billed.billedBeforeCents, thisBillCents: t.contractBilledCents });
  if (overContractCents > 0) {
    warnings.push({ code: 'OVER_CONTRACT', message: `This bill takes the job ${formatMoney(overContractCents, s.currency)} past its contract of ${formatMoney(contract.contractCents, s.currency)} (change orders included). Add a change order, or issue it with the override and a reason.` });
  }
  const cap = r.kind === 'deposit' ? depositCap(contract.contractCents, { pct: s.depositCapPct, cents: s.depositCapCents }) : null;
  const depositCents = t.lines.filter((l) => l.kind === 'contract').reduce((a, l) => a + l.amountCents, 0);
  const depositOverCap = cap !== null && depositCents > cap;
  if (depositOverCap) {
    warnings.push({ code: 'DEPOSIT_OVER_CAP', message: `This deposit of ${formatMoney(depositCents, s.currency)} is over the company's deposit cap of ${formatMoney(cap, s.currency)} for this contract. Lower it, or issue it with the override and a reason.` });
  }
  const { lines: computed, ...totals } = t;
  return { lines: computed, totals, retainagePct, contract, billedBeforeCents: billed.billedBeforeCents, overContractCents, depositCapCents: cap, depositOverCap, warnings };
}

function rowInput(s: BillingSettings, job: JobFacts, v: InvoiceDraftPatch, p: Plan): repo.InvoiceRowInput {
  return {
    jobId: job.id, customerId: job.customerId, kind: v.kind, terms: v.terms, termsDays: termsDays(v.terms, v.termsDays), notes: v.notes,
    taxMode: s.taxMode, taxRatePct: s.taxRatePct, basisPct: v.basisPct, requestedCents: v.kind === 'deposit' ? v.requestedCents : null,
    retainagePct: p.retainagePct, overContractOk: v.overContractOk, overDepositCapOk: v.overDepositCapOk, overrideReason: v.overrideReason,
  };
}

function recipeOf(v: InvoiceDraftPatch): Recipe {
  return { kind: v.kind, basisPct: v.kind === 'deposit' || v.kind === 'progress' ? v.basisPct : null, requestedCents: v.requestedCents, retainagePct: v.retainagePct, extraLines: v.lines, changeOrderIds: v.changeOrderIds };
}

export async function createDraftTx(trx: Knex.Transaction, actor: Actor, input: InvoiceDraftInput): Promise<number> {
  const job = await jobFacts(actor.companyId, input.jobId, trx);
  if (!job) throw new AppError('BAD_INPUT', 'Some fields need attention.', { jobId: 'Choose a job of this company.' });
  const s = await billingSettings(actor.companyId, trx);
  const p = await plan(trx, s, job, recipeOf(input), null);
  const id = await repo.insertInvoice(actor.companyId, { ...rowInput(s, job, input, p), replacesInvoiceId: null }, p.totals, newNonce(), actor.userId, trx);
  await repo.replaceLines(actor.companyId, id, p.lines, trx);
  await audit(trx, actor, 'invoice', id, 'draft', { kind: input.kind, totalCents: p.totals.totalCents });
  return id;
}

export async function createDraft(actor: Actor, input: InvoiceDraftInput) {
  const id = await tx((trx) => createDraftTx(trx, actor, input));
  return getInvoice(actor, id);
}

async function lockedDraft(trx: Knex.Transaction, actor: Actor, id: number): Promise<repo.InvoiceRecord> {
  const inv = await repo.findInvoice(actor.companyId, id, trx, true);
  if (!inv) throw notFound('That invoice');
  if (inv.status !== 'draft') throw new AppError('INVOICE_NOT_DRAFT', `Invoice ${inv.numberText} is issued and cannot be edited. Void it (with a reason) and issue a replacement.`);
  return inv;
}

export async function updateDraft(actor: Actor, id: number, input: InvoiceDraftPatch) {
  await tx(async (trx) => {
    const inv = await lockedDraft(trx, actor, id);
    const job = (await jobFacts(actor.companyId, inv.jobId, trx))!;
    const s = await billingSettings(actor.companyId, trx);
    const p = await plan(trx, s, job, recipeOf(input), id);
    await repo.updateInvoice(actor.companyId, id, rowInput(s, job, input, p), p.totals, trx);
    await repo.replaceLines(actor.companyId, id, p.lines, trx);
    await audit(trx, actor, 'invoice', id, 'edit', { kind: input.kind, totalCents: p.totals.totalCents });
  });
  return getInvoice(actor, id);
}

export async function discardDraft(actor: Actor, id: number): Promise<void> {
  await tx(async (trx) => {
    await lockedDraft(trx, actor, id);
    await trx('invoice_lines').where({ organization_id: actor.companyId, invoice_id: id }).delete();
    await trx('invoices').where({ organization_id: actor.companyId, id }).delete();
    await audit(trx, actor, 'invoice', id, 'discard');
  });
}

async function storedRecipe(trx: Knex.Transaction, actor: Actor, inv: repo.InvoiceRecord): Promise<Recipe> {
  const lines = await repo.invoiceLines(actor.companyId, inv.id, trx);
  return {
    kind: inv.kind,
    basisPct: inv.basisPct,
    requestedCents: inv.requestedCents,
    retainagePct: inv.retainagePct,
    extraLines: lines.filter((l) => l.kind === 'extra').map((l) => ({ description: l.description, category: l.category, quantity: l.quantity, unitPriceCents: l.unitPriceCents, taxable: l.taxable })),
    changeOrderIds: lines.filter((l) => l.kind === 'change_order' && l.changeOrderId).map((l) => l.changeOrderId!),
  };
}

/**
 * Issues a draft: the company's invoice counter is locked first (so issues in a company run
 * one at a time and numbers have no gaps: a failed issue rolls its number back), the lines
 * are rebuilt against what is billed now, the limits are checked, and the number assigned.
 */
export async function issueTx(trx: Knex.Transaction, actor: Actor, id: number, today?: string): Promise<repo.InvoiceRecord> {
  const counter = await repo.takeInvoiceNumber(actor.companyId, trx);
  const inv = await lockedDraft(trx, actor, id);
  const job = (await jobFacts(actor.companyId, inv.jobId, trx))!;
  const s = await billingSettings(actor.companyId, trx);
  const recipe = await storedRecipe(trx, actor, inv);
  // A retainage percent stored on the draft is what was asked; rebuild with it.
  const p = await plan(trx, s, job, recipe, id);
  if (p.overContractCents > 0 && !inv.overContractOk) throw new AppError('OVER_CONTRACT', p.warnings.find((w) => w.code === 'OVER_CONTRACT')!.message);
  if (p.depositOverCap && !inv.overDepositCapOk) throw new AppError('DEPOSIT_OVER_CAP', p.warnings.find((w) => w.code === 'DEPOSIT_OVER_CAP')!.message);
  if (p.totals.totalCents <= 0) throw new AppError('RULE_BROKEN', 'This invoice comes to nothing. Add a line or change the percent.');
  const issuedOn = today ?? todayIn(s.timezone);
  const numberText = formatInvoiceNumber(counter.prefix, counter.number);
  await repo.updateInvoice(actor.companyId, id, { taxMode: s.taxMode as TaxMode, taxRatePct: s.taxRatePct, retainagePct: p.retainagePct }, p.totals, trx, {
    status: 'issued', number: counter.number, number_text: numberText, issued_on: issuedOn, due_on: dueDate(issuedOn, inv.termsDays),
  });
  await repo.replaceLines(actor.companyId, id, p.lines, trx);
  await audit(trx, actor, 'invoice', id, 'issue', { number: numberText, totalCents: p.totals.totalCents, overrideReason: inv.overContractOk || inv.overDepositCapOk ? inv.overrideReason : undefined });
  return (await repo.findInvoice(actor.companyId, id, trx))!;
}

export async function issueInvoice(actor: Actor, id: number) {
  await tx((trx) => issueTx(trx, actor, id));
  return getInvoice(actor, id);
}

/** Queues the invoice e-mail (PDF attached at send time) in the caller's transaction. */
export async function sendTx(trx: Knex.Transaction, actor: Actor, id: number, opts: { mail?: boolean } = {}): Promise<void> {
  let inv = await repo.findInvoice(actor.companyId, id, trx, true);
  if (!inv) throw notFound('That invoice');
  if (inv.status === 'draft') inv = await issueTx(trx, actor, id);
  if (inv.status === 'void') throw new AppError('RULE_BROKEN', 'A void invoice is not sent.');
  const job = (await jobFacts(actor.companyId, inv.jobId, trx))!;
  const cust = await trx('customers').where({ organization_id: actor.companyId, id: inv.customerId }).first('name', 'email');
  if (!cust?.email) throw new AppError('RULE_BROKEN', `${cust?.name ?? 'The customer'} has no e-mail address. Add one to the customer first.`, { email: 'The customer has no e-mail address.' });
  const s = await billingSettings(actor.companyId, trx);
  const n = inv.sendCount + 1;
  if (opts.mail !== false) {
    await enqueueMail(trx, {
      organizationId: actor.companyId,
      ...invoiceMail({ to: cust.email, company: s.companyName, customerName: cust.name, numberText: inv.numberText!, jobTitle: job.title, totalCents: inv.totalCents, balanceCents: inv.balanceCents, dueOn: inv.dueOn, url: invoiceUrl(inv.id, inv.publicNonce), currency: s.currency }),
      attachments: [{ kind: 'invoice-pdf', ref: { invoiceId: inv.id }, filename: `${inv.numberText}.pdf` }],
      dedupeKey: `invoice:${inv.id}:send:${n}`,
    });
  }
  await repo.updateInvoice(actor.companyId, id, {}, null, trx, { sent_at: trx.fn.now(3), send_count: n });
  await audit(trx, actor, 'invoice', id, 'send', { to: cust.email, time: n });
}

export async function sendInvoice(actor: Actor, id: number) {
  await tx((trx) => sendTx(trx, actor, id));
  return getInvoice(actor, id);
}

export async function voidInvoice(actor: Actor, id: number, input: { reason: string; replace: boolean }) {
  const replacement = await tx(async (trx) => {
    const inv = await repo.findInvoice(actor.companyId, id, trx, true);
    if (!inv) throw notFound('That invoice');
    if (inv.status === 'draft') throw new AppError('RULE_BROKEN', 'A draft has no number to void; discard it instead.');
    if (inv.status === 'void') throw new AppError('CONFLICT', `Invoice ${inv.numberText} is void already.`);
    if (inv.paidCents > 0) throw new AppError('RULE_BROKEN', `Invoice ${inv.numberText} has ${formatMoney(inv.paidCents)} paid on it. Refund the payments first, then void it.`);
    await repo.updateInvoice(actor.companyId, id, {}, null, trx, { status: 'void', void_reason: input.reason, voided_at: trx.fn.now(3) });
    await audit(trx, actor, 'invoice', id, 'void', { reason: input.reason, number: inv.numberText });
    if (!input.replace) return null;
    const r = await storedRecipe(trx, actor, inv);
    const newId = await createDraftTx(trx, actor, {
      jobId: inv.jobId, kind: r.kind, basisPct: r.basisPct, requestedCents: r.requestedCents, lines: r.extraLines, changeOrderIds: r.changeOrderIds,
      terms: inv.terms, termsDays: inv.termsDays, notes: inv.notes, retainagePct: inv.retainagePct, overContractOk: inv.overContractOk, overDepositCapOk: inv.overDepositCapOk, overrideReason: inv.overrideReason,
    });
    await repo.updateInvoice(actor.companyId, newId, { replacesInvoiceId: id }, null, trx);
    return newId;
  });
  await expireStaleCheckoutSessions({ companyId: actor.companyId, invoiceId: id });
  return { invoice: await getInvoice(actor, id), replacementId: replacement };
}

/**
 * Revokes the customer's link: a new random half makes every earlier link answer 404.
 * The new link goes out with the next send.
 */
export async function revokeInvoiceLink(actor: Actor, id: number) {
  await tx(async (trx) => {
    const inv = await repo.findInvoice(actor.companyId, id, trx, true);
    if (!inv) throw notFound('That invoice');
    if (inv.status === 'draft') throw new AppError('RULE_BROKEN', 'A draft has no customer link yet.');
    await trx('invoices').where({ organization_id: actor.companyId, id }).update({ public_nonce: newNonce(), updated_at: trx.fn.now(3) });
    await audit(trx, actor, 'invoice', id, 'revoke_link');
  });
  return getInvoice(actor, id);
}

export interface InvoiceDetail extends repo.InvoiceRecord {
  displayStatus: InvoiceStatus | 'overdue';
  kindLabel: string;
  job: JobFacts;
  customer: { id: number; name: string; email: string | null; address: string[] };
  lines: Line[];
  payments: repo.PaymentRecord[];
  refunds: repo.RefundRecord[];
  contract: JobContract;
  billedBeforeCents: number;
  warnings: Warning[];
  history: { at: string; who: string; action: string; detail: unknown }[];
  publicUrl: string | null;
  today: string;
}

export async function invoiceDetail(companyId: string, id: number, q: Q = db()): Promise<InvoiceDetail> {
  const inv = await repo.findInvoice(companyId, id, q);
  if (!inv) throw notFound('That invoice');
  const s = await billingSettings(companyId, q);
  const job = (await jobFacts(companyId, inv.jobId, q))!;
  const c = await q('customers').where({ organization_id: companyId, id: inv.customerId }).first();
  const [lines, payments, refunds, contract, billed] = await Promise.all([
    repo.invoiceLines(companyId, id, q), repo.invoicePayments(companyId, id, q), repo.invoiceRefunds(companyId, id, q),
    jobContract(companyId, inv.jobId, q), repo.jobBilled(companyId, inv.jobId, id, q),
  ]);
  const warnings: Warning[] = [];
  if (inv.status === 'draft') {
    try {
      const p = await plan(q as Knex.Transaction, s, job, await storedRecipe(q as Knex.Transaction, { companyId, userId: '', role: 'owner' }, inv), id);
      warnings.push(...p.warnings);
    } catch (err) {
      if (err instanceof AppError) warnings.push({ code: 'NOTHING_TO_BILL', message: err.message });
      else throw err;
    }
    if (!c?.email) warnings.push({ code: 'NO_EMAIL', message: `${c?.name} has no e-mail address; add one before sending.` });
  }
  const history = await q('audit_log as a').leftJoin('user as u', 'u.id', 'a.user_id').where({ 'a.organization_id': companyId, 'a.entity': 'invoice', 'a.entity_id': String(id) }).orderBy('a.id').select('a.created_at', 'a.action', 'a.detail', 'u.name');
  const today = todayIn(s.timezone);
  return {
    ...inv,
    displayStatus: displayStatus(inv, today),
    kindLabel: INVOICE_KIND_LABELS[inv.kind],
    job,
    customer: { id: inv.customerId, name: c?.name ?? '', email: c?.email ?? null, address: [c?.billing_line1, c?.billing_line2, [c?.billing_city, [c?.billing_region, c?.billing_postal].filter(Boolean).join(' ')].filter(Boolean).join(', ')].filter(Boolean) },
    lines, payments, refunds,
    contract: contract!,
    billedBeforeCents: billed.billedBeforeCents,
    warnings,
    history: history.map((h) => ({ at: new Date(h.created_at).toISOString(), who: h.name ?? 'Tallypost', action: h.action, detail: typeof h.detail === 'string' ? JSON.parse(h.detail) : h.detail })),
    publicUrl: inv.status === 'draft' ? null : invoiceUrl(inv.id, inv.publicNonce),
    today,
  };
}

export const getInvoice = (actor: Actor, id: number) => invoiceDetail(actor.companyId, id);

export async function listInvoices(actor: Actor, query: { status: (InvoiceStatus | 'overdue')[]; jobId?: number; q?: string }) {
  const s = await billingSettings(actor.companyId);
  const today = todayIn(s.timezone);
  const stored = query.status.filter((x): x is InvoiceStatus => x !== 'overdue');
  const wantOverdue = query.status.includes('overdue');
  const rows = await repo.listInvoices(actor.companyId, { jobId: query.jobId, q: query.q, statuses: wantOverdue ? [...stored, 'issued', 'partly_paid'] : stored });
  const items = rows.map((r) => ({ ...r, displayStatus: displayStatus(r, today) })).filter((r) => !query.status.length || query.status.includes(r.displayStatus));
  return { items, today, currency: s.currency };
}

/** The job page's billing position: contract, billed, retainage, collected and what is owed. */
export async function jobBilling(actor: Actor, jobId: number) {
  const contract = await jobContract(actor.companyId, jobId);
  if (!contract) throw notFound('That job');
  const billed = await repo.jobBilled(actor.companyId, jobId, null);
  const { items, today } = await listInvoices(actor, { status: [], jobId });
  const changeOrders = await listChangeOrders(actor.companyId, jobId);
  return { contract, billed, invoices: items, changeOrders, today };
}
