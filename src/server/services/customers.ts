import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import { notFound } from '../../lib/errors.ts';
import type { Customer, CustomerInput } from '../../lib/customers/schema.ts';
import * as customers from '../repos/customers.ts';
import { audit } from '../repos/audit.ts';

export async function listCustomers(actor: Actor, query: { q?: string; page: number; pageSize: number }) {
  const r = await customers.listCustomers(actor.companyId, query);
  return { ...r, page: query.page, pageSize: query.pageSize };
}

export async function getCustomer(actor: Actor, id: number): Promise<Customer> {
  const c = await customers.findCustomer(actor.companyId, id);
  if (!c) throw notFound('That customer');
  return c;
}

export async function createCustomer(actor: Actor, input: CustomerInput): Promise<Customer> {
  const id = await db().transaction(async (trx) => {
    const newId = await customers.insertCustomer(actor.companyId, input, trx);
    await audit(trx, actor, 'customer', newId, 'create');
    return newId;
  });
  return getCustomer(actor, id);
}

export async function updateCustomer(actor: Actor, id: number, input: Partial<CustomerInput>): Promise<Customer> {
  await getCustomer(actor, id);
  await db().transaction(async (trx) => {
    await customers.updateCustomer(actor.companyId, id, input, trx);
    await audit(trx, actor, 'customer', id, 'update', { fields: Object.keys(input) });
  });
  return getCustomer(actor, id);
}
