import knexFactory, { type Knex } from 'knex';
import { knexConfig } from './db-config.ts';
import { env } from './env.ts';

let instance: Knex | undefined;

/** The one Knex instance of this process. */
export function db(): Knex {
  instance ??= knexFactory(knexConfig(env().DATABASE_URL));
  return instance;
}

export async function closeDb(): Promise<void> {
  if (instance) await instance.destroy();
  instance = undefined;
}

/** True when MariaDB answers a trivial query within a short time. */
export async function databaseUp(): Promise<boolean> {
  try {
    await db().raw('SELECT 1');
    return true;
  } catch {
    return false;
  }
}

/** mysql2 returns SUM(bigint) and DECIMAL as strings; this turns one into a safe integer. */
export function toInt(value: unknown): number {
  if (value === null || value === undefined) return 0;
  const n = typeof value === 'number' ? value : Number(value);
  if (!Number.isSafeInteger(n)) throw new Error(`not a safe integer: ${String(value)}`);
  return n;
}
