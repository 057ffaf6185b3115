import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { startProc, type Proc } from './procs.ts';

export interface MariaDb {
  dataDir: string;
  port: number;
  socket: string;
  pidFile: string;
  proc?: Proc;
}

function sh(cmd: string, args: string[], input?: string): { ok: boolean; out: string } {
  const r = spawnSync(cmd, args, { input, encoding: 'utf8' });
  return { ok: r.status === 0, out: `${r.stdout ?? ''}${r.stderr ?? ''}` };
}

function alive(pid: number): boolean {
  try { process.kill(pid, 0); return true; } catch { return false; }
}

export function ping(m: MariaDb): boolean {
  return sh('mariadb-admin', ['--no-defaults', `--socket=${m.socket}`, '-uroot', '--connect-timeout=2', 'ping']).ok;
}

/** Initialises the data folder once, then starts mariadbd bound to 127.0.0.1. */
export async function startMariaDb(m: MariaDb, logDir: string, cwd: string): Promise<void> {
  mkdirSync(m.dataDir, { recursive: true });
  if (!existsSync(path.join(m.dataDir, 'mysql'))) {
    const r = sh('mariadb-install-db', [
      '--no-defaults', `--datadir=${m.dataDir}`, '--user=root',
      '--auth-root-authentication-method=normal', '--skip-test-db',
    ]);
    if (!r.ok) throw new Error(`mariadb-install-db failed:\n${r.out}`);
  }
  // A server left running from an earlier run on this folder is reused.
  if (existsSync(m.pidFile)) {
    const pid = Number(readFileSync(m.pidFile, 'utf8').trim());
    if (pid && alive(pid) && ping(m)) return;
  }
  // Its own temporary folder: a shared /tmp may be swept while a large GROUP BY has a
  // temporary table there.
  const tmpDir = path.join(path.dirname(m.dataDir), 'mariadb-tmp');
  mkdirSync(tmpDir, { recursive: true });
  m.proc = startProc('mariadb', '/usr/sbin/mariadbd', [
    '--no-defaults', `--datadir=${m.dataDir}`, '--user=root',
    '--bind-address=127.0.0.1', `--port=${m.port}`, `--socket=${m.socket}`, `--pid-file=${m.pidFile}`,
    '--skip-name-resolve', '--character-set-server=utf8mb4', '--collation-server=utf8mb4_unicode_ci',
    '--default-time-zone=+00:00',
    '--sql-mode=STRICT_ALL_TABLES,ERROR_FOR_DIVISION_BY_ZERO,NO_ZERO_DATE,NO_ZERO_IN_DATE,NO_ENGINE_SUBSTITUTION',
    '--innodb-flush-log-at-trx-commit=1', '--innodb-doublewrite=1', '--sync-binlog=1',
    // The buffer pool holds ten years of one company's cost lines and their indexes.
    '--max-connections=300', '--innodb-buffer-pool-size=1G', '--max-allowed-packet=64M', `--tmpdir=${tmpDir}`,
    `--log-error=${path.join(logDir, 'mariadb-error.log')}`,
  ], { env: process.env, logDir, cwd });
  const until = Date.now() + 60_000;
  while (Date.now() < until) {
    if (m.proc.child.exitCode !== null) {
      throw new Error(`mariadbd exited (${m.proc.child.exitCode}); see ${path.join(logDir, 'mariadb-error.log')}`);
    }
    if (ping(m)) return;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error('mariadbd did not answer within 60 s');
}

/** Creates the database and an app user that reaches it over TCP on loopback. */
export function createDatabase(m: MariaDb, database: string, user: string, password: string): void {
  const sql = [
    `CREATE DATABASE IF NOT EXISTS \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`,
    `CREATE USER IF NOT EXISTS '${user}'@'127.0.0.1' IDENTIFIED BY '${password}';`,
    `ALTER USER '${user}'@'127.0.0.1' IDENTIFIED BY '${password}';`,
    // A private instance on loopback: the app user may create scratch databases too
    // (restore checks and benchmarks use them).
    `GRANT ALL PRIVILEGES ON *.* TO '${user}'@'127.0.0.1';`,
    'FLUSH PRIVILEGES;',
  ].join('\n');
  const r = sh('mariadb', ['--no-defaults', `--socket=${m.socket}`, '-uroot', '--default-character-set=utf8mb4'], sql);
  if (!r.ok) throw new Error(`creating the database failed:\n${r.out}`);
}

export async function stopMariaDb(m: MariaDb): Promise<void> {
  if (!existsSync(m.pidFile)) return;
  const pid = Number(readFileSync(m.pidFile, 'utf8').trim());
  if (!pid || !alive(pid)) return;
  process.kill(pid, 'SIGTERM');
  const until = Date.now() + 30_000;
  while (alive(pid) && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
  if (alive(pid)) process.kill(pid, 'SIGKILL');
}
