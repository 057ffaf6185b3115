import { readFileSync } from 'node:fs';

/** What `npm test` started: URLs, the database, the stand-ins. Written by src/cli/stack.ts. */
export interface Stack {
  root: string;
  appUrl: string;
  databaseUrl: string;
  outDir: string;
  logDir: string;
  dataRoot: string;
  mailApi: string;
  stripeApi: string;
  stripeWebhookSecret: string;
  demoPassword: string;
  appEnv: Record<string, string>;
  mariadb: { port: number; socket: string; pidFile: string; dataDir: string } | null;
  pids: { app: number; worker: number };
}

let cached: Stack | undefined;
export function stack(): Stack {
  if (!cached) {
    const file = process.env.TALLYPOST_STACK;
    if (!file) throw new Error('TALLYPOST_STACK is not set: run the API and browser tests through `npm test`.');
    cached = JSON.parse(readFileSync(file, 'utf8')) as Stack;
  }
  return cached;
}
