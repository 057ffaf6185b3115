import type { Knex } from 'knex';
import { seedDemoCosts } from '../src/server/seed/costs.ts';

/** Actual costs for the demo jobs: receipts from three suppliers, crew hours, rentals, fees. */
export async function seed(knex: Knex): Promise<void> {
  await seedDemoCosts(knex);
}
