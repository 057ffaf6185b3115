import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.on('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const a = s.address();
      s.close(() => (a && typeof a === 'object' ? resolve(a.port) : reject(new Error('no port'))));
    });
  });
}

/** Runs `npm start` (its entry script) once and times it from launch to a healthy /api/health. */
async function timeOneStart(root: string, env: NodeJS.ProcessEnv, port: number): Promise<number> {
  const t0 = performance.now();
  const child = spawn(process.execPath, [path.join(root, 'src/cli/start.mjs')], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
  let out = '';
  child.stdout!.on('data', (d) => { out += d; });
  child.stderr!.on('data', (d) => { out += d; });
  try {
    for (;;) {
      if (child.exitCode !== null) throw new Error(`npm start exited early:\n${out.slice(-2000)}`);
      try {
        const r = await fetch(`http://127.0.0.1:${port}/api/health`, { signal: AbortSignal.timeout(1000) });
        if (r.status === 200) return (performance.now() - t0) / 1000;
      } catch { /* not up yet */ }
      if (performance.now() - t0 > 300_000) throw new Error(`npm start was not healthy in 300 s:\n${out.slice(-2000)}`);
      await new Promise((r) => setTimeout(r, 100));
    }
  } finally {
    const exited = child.exitCode !== null ? Promise.resolve() : new Promise((r) => child.once('exit', r));
    try { process.kill(-child.pid!, 'SIGINT'); } catch { /* gone */ }
    await Promise.race([exited, new Promise((r) => setTimeout(r, 60_000))]);
    // Wait until nothing answers on the port any more, so the next start is timed from scratch;
    // a stack still answering after Ctrl-C is a failure of npm start, not a fast restart.
    let stopped = false;
    for (let i = 0; i < 300 && !stopped; i++) {
      try { await fetch(`http://127.0.0.1:${port}/api/health`, { signal: AbortSignal.timeout(500) }); } catch { stopped = true; }
      if (!stopped) await new Promise((r) => setTimeout(r, 100));
    }
    if (!stopped) throw new Error(`npm start still answered on port ${port} 30 s after Ctrl-C`);
  }
}

/**
 * Cold: a fresh data folder and a fresh build folder (MariaDB initialised, migrated, seeded,
 * the app built). Warm: the same folders again. npm packages and Debian packages are
 * already installed in both.
 */
export async function coldAndWarmStart(root: string): Promise<{ coldS: number; warmS: number }> {
  // Inside the project: the built server resolves its packages from the project's node_modules.
  mkdirSync(path.join(root, '.data'), { recursive: true });
  const dir = mkdtempSync(path.join(root, '.data', 'bench-start-'));
  try {
    const ports = { PORT: await freePort(), DB_PORT: await freePort(), SMTP_PORT: await freePort(), MAIL_WEB_PORT: await freePort(), STRIPE_FAKE_PORT: await freePort() };
    const env: NodeJS.ProcessEnv = {
      ...Object.fromEntries(Object.entries(process.env).filter(([k]) => !/^(DATABASE_URL|APP_URL|AUTH_SECRET|LINK_SIGNING_SECRET|SMTP_|STRIPE_|TALLYPOST_|SIGN_IN_|PORT|HOST|NODE_ENV)/.test(k))),
      TALLYPOST_DATA_DIR: path.join(dir, 'data'),
      TALLYPOST_DIST_DIR: path.join(dir, 'dist'),
      ...Object.fromEntries(Object.entries(ports).map(([k, v]) => [k, String(v)])),
    };
    const coldS = await timeOneStart(root, env, ports.PORT);
    const warmS = await timeOneStart(root, env, ports.PORT);
    return { coldS, warmS };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
