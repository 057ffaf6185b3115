import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

// unit: pure src/lib, no server. api: real HTTP against the built server and MariaDB.
// e2e: Debian's Chromium through playwright-core. faults: crashes and restarts.
// api, e2e and faults need `npm test`'s stack; src/cli/stack.ts runs the projects one by one.
export default defineConfig({
  root,
  test: {
    projects: [
      { extends: true, test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' } },
      { extends: true, test: { name: 'api', include: ['tests/api/**/*.test.ts'], testTimeout: 60_000, hookTimeout: 120_000, fileParallelism: false } },
      { extends: true, test: { name: 'e2e', include: ['tests/e2e/**/*.test.ts'], testTimeout: 120_000, hookTimeout: 120_000, fileParallelism: false } },
      // Stops MariaDB, kills app processes: runs alone, after the others.
      { extends: true, test: { name: 'faults', include: ['tests/faults/**/*.test.ts'], testTimeout: 300_000, hookTimeout: 300_000, fileParallelism: false } },
    ],
  },
});
