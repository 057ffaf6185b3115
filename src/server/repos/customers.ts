import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { Customer, CustomerInput } from '../../lib/customers/schema.ts';

type Q = Knex | Knex.Transaction;

const COLUMNS: Record<keyof CustomerInput, string> = {
  name: 'name',
  email: 'email',
  phone: 'phone',
  billingLine1: 'billing_line1',
  billingLine2: 'billing_line2',
  billingCity: 'billing_city',
  billingRegion: 'billing_region',
  billingPostal: 'billing_postal',
  siteLine1: 'site_line1',
  siteCity: 'site_city',
  siteRegion: 'site_region',
  sitePostal: 'site_postal',
  notes: 'notes',
};

function toRow(input: Partial<CustomerInput>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, col] of Object.entries(COLUMNS)) {
    if (key in input) row[col] = (input as Record<string, unknown>)[key];
  }
  return row;
}

function fromRow(r: Record<string, unknown>): Customer {
  const c: Record<string, unknown> = { id: Number(r.id), createdAt: new Date(r.created_at as string).toISOString() };
  for (const [key, col] of Object.entries(COLUMNS)) c[key] = r[col] ?? null;
  if (r.job_count !== undefined) c.jobCount = Number(r.job_count);
  return c as unknown as Customer;
}

export async function listCustomers(companyId: string, opts: { q?: string; page: number; pageSize: number }, q: Q = db()) {
  const base = q('customers as c').where('c.organization_id', companyId);
  if (opts.q) {
    const like = `%${opts.q.replace(/[\\%_]/g, (m) => `\\${m}`)}%`;
    base.andWhere((w) => w.whereILike('c.name', like).orWhereILike('c.email', like).orWhereILike('c.phone', like).orWhereILike('c.site_city', like));
  }
  const [{ n }] = await base.clone().count({ n: '*' });
  const rows = await base
    .clone()
    .select('c.*')
    .select(q.raw('(SELECT COUNT(*) FROM jobs j WHERE j.organization_id = c.organization_id AND j.customer_id = c.id) AS job_count'))
    .orderBy('c.name')
    .limit(opts.pageSize)
    .offset((opts.page - 1) * opts.pageSize);
  return { items: rows.map(fromRow), total: Number(n) };
}

export async function findCustomer(companyId: string, id: number, q: Q = db()): Promise<Customer | undefined> {
  const r = await q('customers').where({ organization_id: companyId, id }).first();
  return r ? fromRow(r) : undefined;
}

export async function insertCustomer(companyId: string, input: CustomerInput, q: Q = db()): Promise<number> {
  const [id] = await q('customers').insert({ organization_id: companyId, ...toRow(input) });
  return Number(id);
}

export async function updateCustomer(companyId: string, id: number, input: Partial<CustomerInput>, q: Q = db()): Promise<boolean> {
  const row = toRow(input);
  if (Object.keys(row).length === 0) return true;
  const n = await q('customers').where({ organization_id: companyId, id }).update({ ...row, updated_at: q.fn.now(3) });
  return n > 0;
}

/** Names for a picker. */
export async function customerOptions(companyId: string, q: Q = db()): Promise<{ id: number; name: string }[]> {
  const rows = await q('customers').where('organization_id', companyId).orderBy('name').select('id', 'name');
  return rows.map((r) => ({ id: Number(r.id), name: r.name }));
}
