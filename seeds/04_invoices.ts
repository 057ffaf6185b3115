import type { Knex } from 'knex';
import { seedDemoInvoices } from '../src/server/seed/invoices.ts';

/** Invoices, change orders and payments for the demo jobs (after the bids seed set the contracts). */
export async function seed(knex: Knex): Promise<void> {
  await seedDemoInvoices(knex);
}
