import knexFactory, { type Knex } from 'knex';
import { knexConfig } from '../../src/server/db-config.ts';
import { stack } from './stack.ts';

let k: Knex | undefined;
/** Direct access to the test database, for checks that compare the API with the rows. */
export function testDb(): Knex {
  k ??= knexFactory(knexConfig(stack().databaseUrl, { min: 0, max: 4 }));
  return k;
}
export async function closeTestDb(): Promise<void> {
  await k?.destroy();
  k = undefined;
}
