import type { Knex } from 'knex';
import { seedDemoCompany } from '../src/server/seed/demo.ts';

/** The demo company, its four members, about 40 customers and 60 jobs. */
export async function seed(knex: Knex): Promise<void> {
  await seedDemoCompany(knex, process.env.DEMO_PASSWORD || 'tallypost-demo');
}
