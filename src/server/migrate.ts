import knexFactory from 'knex';
import { knexConfig } from './db-config.ts';

/** Runs every pending Knex migration against the database at url. */
export async function migrateLatest(url: string): Promise<void> {
  const k = knexFactory(knexConfig(url, { min: 0, max: 2 }));
  try {
    const [, applied] = await k.migrate.latest();
    if (applied.length) console.log(`[db] applied ${applied.length} migration(s)`);
  } finally {
    await k.destroy();
  }
}

/**
 * Seeds the demo company once: the seeds look for the demo company and return early when
 * it exists, so a second start keeps whatever the demo users changed.
 */
export async function seedDemo(url: string, password: string): Promise<boolean> {
  const k = knexFactory(knexConfig(url, { min: 0, max: 4 }));
  try {
    const exists = await k('organization').where('slug', 'thornbury-fence-demo').first();
    if (exists) return false;
    process.env.DEMO_PASSWORD = password;
    await k.seed.run();
    return true;
  } finally {
    await k.destroy();
  }
}
