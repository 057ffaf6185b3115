import type { Knex } from 'knex';
import { db, toInt } from '../db.ts';
import { contractToDate } from '../../lib/billing/contract.ts';
import type { CostCategory } from '../../lib/costs/categories.ts';

type Q = Knex | Knex.Transaction;

export type ChangeOrderStatus = 'proposed' | 'approved' | 'declined';

export interface ChangeOrder {
  id: number;
  jobId: number;
  number: number;
  label: string;
  description: string;
  priceCents: number;
  costs: Partial<Record<CostCategory, number>>;
  status: ChangeOrderStatus;
  approvedOn: string | null;
  approvedByName: string | null;
  /** The invoice (not void) that bills it, if any. */
  billedOnInvoiceId: number | null;
  createdAt: string;
}

function fromRow(r: Record<string, unknown>): ChangeOrder {
  const costs = typeof r.cost_estimate === 'string' ? JSON.parse(r.cost_estimate) : (r.cost_estimate ?? {});
  return {
    id: Number(r.id),
    jobId: Number(r.job_id),
    number: Number(r.number),
    label: `CO-${r.number}`,
    description: String(r.description),
    priceCents: toInt(r.price_cents),
    costs,
    status: r.status as ChangeOrderStatus,
    approvedOn: (r.approved_on as string) ?? null,
    approvedByName: (r.approved_by_name as string) ?? null,
    billedOnInvoiceId: r.billed_on == null ? null : Number(r.billed_on),
    createdAt: new Date(r.created_at as string).toISOString(),
  };
}

function select(q: Q, companyId: string) {
  return q('change_orders as co')
    .where('co.organization_id', companyId)
    .select('co.*')
    .select(
      q.raw(
        `(SELECT MIN(l.invoice_id) FROM invoice_lines l JOIN invoices i ON i.id = l.invoice_id AND i.organization_id = l.organization_id
          WHERE l.organization_id = co.organization_id AND l.change_order_id = co.id AND i.status <> 'void') AS billed_on`,
      ),
    );
}

export async function listChangeOrders(companyId: string, jobId: number, q: Q = db()): Promise<ChangeOrder[]> {
  return (await select(q, companyId).andWhere('co.job_id', jobId).orderBy('co.number')).map(fromRow);
}

export async function findChangeOrder(companyId: string, id: number, q: Q = db(), lock = false): Promise<ChangeOrder | undefined> {
  const b = select(q, companyId).andWhere('co.id', id).first();
  if (lock) b.forUpdate();
  const r = await b;
  return r ? fromRow(r) : undefined;
}

export async function insertChangeOrder(companyId: string, row: { jobId: number; description: string; priceCents: number; costs: Record<string, number>; createdBy: string }, trx: Knex.Transaction): Promise<number> {
  // The job row is locked so two change orders on one job never take the same number.
  await trx('jobs').where({ organization_id: companyId, id: row.jobId }).forUpdate().first('id');
  const last = await trx('change_orders').where({ organization_id: companyId, job_id: row.jobId }).max({ n: 'number' }).first();
  const [id] = await trx('change_orders').insert({
    organization_id: companyId,
    job_id: row.jobId,
    number: Number(last?.n ?? 0) + 1,
    description: row.description,
    price_cents: row.priceCents,
    cost_estimate: JSON.stringify(row.costs),
    created_by: row.createdBy,
  });
  return Number(id);
}

export async function decideChangeOrder(companyId: string, id: number, d: { status: ChangeOrderStatus; decidedOn: string; approvedByName: string | null }, trx: Knex.Transaction): Promise<void> {
  await trx('change_orders').where({ organization_id: companyId, id }).update({
    status: d.status,
    approved_on: d.status === 'approved' ? d.decidedOn : null,
    approved_by_name: d.status === 'approved' ? d.approvedByName : null,
    updated_at: trx.fn.now(3),
  });
}

/** An approved change order's estimated cost goes to job_estimates beside the bid's rows. */
export async function writeChangeOrderEstimate(companyId: string, co: ChangeOrder, trx: Knex.Transaction): Promise<void> {
  await trx('job_estimates').where({ organization_id: companyId, source: 'change_order', source_id: co.id }).delete();
  const rows = Object.entries(co.costs)
    .filter(([, cents]) => (cents ?? 0) > 0)
    .map(([category, cents]) => ({ organization_id: companyId, job_id: co.jobId, category, amount_cents: cents, source: 'change_order', source_id: co.id }));
  if (rows.length) await trx('job_estimates').insert(rows);
}

export interface JobContract {
  /** jobs.contract_cents: the accepted bid's price (null before a bid is accepted). */
  baseCents: number | null;
  approvedChangeOrdersCents: number;
  approvedChangeOrders: number;
  /** Contract to date: base plus approved change orders. */
  contractCents: number;
}

/**
 * A job's contract including its approved change orders. Margins and billing both read it;
 * jobs.contract_cents itself is never written here.
 */
export async function jobContract(companyId: string, jobId: number, q: Q = db()): Promise<JobContract | undefined> {
  const job = await q('jobs').where({ organization_id: companyId, id: jobId }).first('contract_cents');
  if (!job) return undefined;
  const cos = await q('change_orders').where({ organization_id: companyId, job_id: jobId, status: 'approved' }).select('price_cents');
  const prices = cos.map((c) => toInt(c.price_cents));
  const base = job.contract_cents == null ? null : toInt(job.contract_cents);
  return { baseCents: base, approvedChangeOrdersCents: contractToDate(0, prices), approvedChangeOrders: prices.length, contractCents: contractToDate(base, prices) };
}
