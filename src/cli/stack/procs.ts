import { spawn, type ChildProcess } from 'node:child_process';
import { createWriteStream, mkdirSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';

export interface Proc {
  name: string;
  child: ChildProcess;
  log: string;
}

/** A free TCP port on loopback. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      srv.close(() => (typeof addr === 'object' && addr ? resolve(addr.port) : reject(new Error('no port'))));
    });
  });
}

export function portInUse(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect({ port, host: '127.0.0.1' });
    s.once('connect', () => { s.destroy(); resolve(true); });
    s.once('error', () => resolve(false));
  });
}

/**
 * Starts a child in its own process group (so a terminal's Ctrl-C reaches only the stack
 * runner, which stops the children in order) with its output in a log file.
 */
export function startProc(name: string, cmd: string, args: string[], opts: { env: NodeJS.ProcessEnv; logDir: string; cwd: string; inherit?: boolean }): Proc {
  mkdirSync(opts.logDir, { recursive: true });
  const log = path.join(opts.logDir, `${name}.log`);
  const out = createWriteStream(log, { flags: 'a' });
  const child = spawn(cmd, args, { cwd: opts.cwd, env: opts.env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
  // Both streams feed one file: neither may end it for the other.
  child.stdout?.pipe(out, { end: false });
  child.stderr?.pipe(out, { end: false });
  child.once('close', () => out.end());
  if (opts.inherit) {
    child.stdout?.on('data', (d) => process.stdout.write(d));
    child.stderr?.on('data', (d) => process.stderr.write(d));
  }
  return { name, child, log };
}

export async function stopProc(p: Proc, timeoutMs = 10_000): Promise<void> {
  if (p.child.exitCode !== null || p.child.signalCode !== null) return;
  const exited = new Promise<void>((r) => p.child.once('exit', () => r()));
  try { process.kill(-p.child.pid!, 'SIGTERM'); } catch { /* already gone */ }
  const timer = setTimeout(() => { try { process.kill(-p.child.pid!, 'SIGKILL'); } catch { /* gone */ } }, timeoutMs);
  await exited;
  clearTimeout(timer);
}

/** Waits until fetch(url) answers with the expected status, or fails with the log's tail. */
export async function waitForHttp(url: string, opts: { timeoutMs: number; proc?: Proc; status?: number }): Promise<void> {
  const until = Date.now() + opts.timeoutMs;
  let last = '';
  while (Date.now() < until) {
    if (opts.proc && opts.proc.child.exitCode !== null) {
      throw new Error(`${opts.proc.name} exited with code ${opts.proc.child.exitCode}; see ${opts.proc.log}`);
    }
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(2000) });
      if (res.status === (opts.status ?? 200)) return;
      last = `status ${res.status}`;
    } catch (e) {
      last = e instanceof Error ? e.message : String(e);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${url} did not answer in ${opts.timeoutMs} ms (${last})`);
}
