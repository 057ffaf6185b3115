import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

/** Debian package → a file that proves it is installed. */
const PROOF: Record<string, string> = {
  'mariadb-server': '/usr/sbin/mariadbd',
  'mariadb-client': '/usr/bin/mariadb-dump',
  chromium: '/usr/bin/chromium',
};

/** Installs the Debian packages that are missing, with apt-get, as root (or through sudo). */
export function ensureDebianPackages(packages: string[]): void {
  const missing = packages.filter((p) => !existsSync(PROOF[p] ?? `/nonexistent/${p}`));
  if (missing.length === 0) return;
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  const sudo = isRoot ? [] : ['sudo', '-n'];
  if (!isRoot && spawnSync('sudo', ['-n', 'true']).status !== 0) {
    throw new Error(`Missing Debian packages: ${missing.join(', ')}. Install them as root: apt-get install -y ${missing.join(' ')}`);
  }
  console.log(`[start] installing Debian packages: ${missing.join(', ')} (this takes a minute the first time) ...`);
  const envs = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const run = (args: string[]) => {
    const [cmd, ...rest] = [...sudo, ...args];
    const r = spawnSync(cmd, rest, { stdio: ['ignore', 'ignore', 'inherit'], env: envs });
    return r.status === 0;
  };
  // The package lists may be missing or stale on a fresh machine: update, then install.
  run(['apt-get', 'update', '-qq']);
  if (!run(['apt-get', 'install', '-y', '-qq', '--no-install-recommends', ...missing])) {
    throw new Error(`apt-get install ${missing.join(' ')} failed; see the messages above.`);
  }
  for (const p of missing) {
    if (!existsSync(PROOF[p])) throw new Error(`${p} installed but ${PROOF[p]} is not there`);
  }
}
