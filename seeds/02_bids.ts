import type { Knex } from 'knex';
import { seedDemoBids } from '../src/server/seed/bids.ts';

/** The demo price book, style recipes, labour-rate versions, bids and pre-dig checklists. */
export async function seed(knex: Knex): Promise<void> {
  await seedDemoBids(knex);
}
