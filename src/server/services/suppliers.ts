import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import * as suppliers from '../repos/suppliers.ts';
import { audit } from '../repos/audit.ts';

export const listSuppliers = (actor: Actor) => suppliers.listSuppliers(actor.companyId);

/** Adds a supplier by name, or returns the one that already has it. */
export async function addSupplier(actor: Actor, name: string) {
  return db().transaction(async (trx) => {
    const existing = await suppliers.findSupplierByName(actor.companyId, name, trx);
    if (existing) return { ...existing, created: false };
    const s = await suppliers.ensureSupplier(actor.companyId, name, trx);
    await audit(trx, actor, 'supplier', s.id, 'create', { name: s.name });
    return { ...s, created: true };
  });
}
