#!/usr/bin/env node
// Entry of `npm start` and `npm test`. Plain Node with no dependencies, because on a fresh
// clone nothing is installed yet: it runs `npm ci` when node_modules is missing or older
// than the lock file, then hands over to the TypeScript stack runner.
import { spawnSync, spawn } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const lock = path.join(root, 'package-lock.json');
const stamp = path.join(root, 'node_modules', '.package-lock.json');

const [major, minor] = process.versions.node.split('.').map(Number);
if (major < 20 || (major === 20 && minor < 19)) {
  console.error(`Tallypost needs Node.js 20.19 or newer; this is ${process.versions.node}.`);
  process.exit(1);
}

const stale = !existsSync(stamp) || statSync(stamp).mtimeMs < statSync(lock).mtimeMs;
if (stale) {
  console.log('[start] installing npm packages (npm ci) ...');
  const r = spawnSync('npm', ['ci', '--no-audit', '--no-fund'], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) {
    console.error('[start] npm ci failed; see the output above.');
    process.exit(r.status ?? 1);
  }
}

const child = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'src/cli/stack.ts'), ...process.argv.slice(2)], {
  cwd: root,
  stdio: 'inherit',
  env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
});
// The stack runner handles Ctrl-C itself (it stops what it started); we only wait for it.
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig));
child.on('exit', (code, signal) => process.exit(code ?? (signal ? 130 : 1)));
