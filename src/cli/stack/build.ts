import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';

const INPUTS = ['src', 'public', 'astro.config.mjs', 'tailwind.config.mjs', 'tsconfig.json', 'package-lock.json'];

function walk(root: string, rel: string, out: string[]): void {
  const abs = path.join(root, rel);
  if (!existsSync(abs)) return;
  const st = statSync(abs);
  if (st.isDirectory()) {
    for (const name of readdirSync(abs).sort()) walk(root, path.join(rel, name), out);
  } else {
    out.push(`${rel}:${st.size}:${Math.floor(st.mtimeMs)}`);
  }
}

/** A fingerprint of everything the build reads; a warm start skips the build when it matches. */
function fingerprint(root: string): string {
  const files: string[] = [];
  for (const input of INPUTS) walk(root, input, files);
  return createHash('sha256').update(files.join('\n')).digest('hex');
}

/** Builds the app into outDir unless the sources are unchanged since the last build. */
export function buildIfStale(root: string, outDir: string): void {
  const stampFile = path.join(outDir, '.build-stamp');
  const fp = fingerprint(root);
  if (existsSync(path.join(outDir, 'server/entry.mjs')) && existsSync(stampFile) && readFileSync(stampFile, 'utf8') === fp) {
    console.log('[start] build is up to date');
    return;
  }
  console.log(`[start] building the app into ${path.relative(root, outDir) || outDir} ...`);
  const r = spawnSync(process.execPath, [path.join(root, 'node_modules/astro/astro.js'), 'build', '--outDir', outDir], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
  });
  if (r.status !== 0) throw new Error('astro build failed; see the output above.');
  writeFileSync(stampFile, fp);
}
