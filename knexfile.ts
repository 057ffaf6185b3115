import type { Knex } from 'knex';
import { knexConfig } from './src/server/db-config.ts';

// Used by the knex CLI (node --import tsx node_modules/knex/bin/cli.js ...). The app and
// the start command build the same config through src/server/db-config.ts.
const config: Knex.Config = knexConfig(process.env.DATABASE_URL ?? '');
export default config;
