import { spawn, type ChildProcess } from 'node:child_process';
import http from 'node:http';
import net from 'node:net';
import path from 'node:path';
import { stack } from './stack.ts';

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const a = srv.address();
      srv.close(() => (a && typeof a === 'object' ? resolve(a.port) : reject(new Error('no port'))));
    });
  });
}

export interface Proc {
  child: ChildProcess;
  url?: string;
  output: () => string;
  kill: (signal?: NodeJS.Signals) => Promise<void>;
}

function spawnNode(args: string[], env: NodeJS.ProcessEnv): Proc {
  const child = spawn(process.execPath, args, { cwd: stack().root, env, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  child.stdout!.on('data', (d) => { out += d; });
  child.stderr!.on('data', (d) => { out += d; });
  return {
    child,
    output: () => out,
    kill: (signal = 'SIGTERM') =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill(signal);
      }),
  };
}

export async function waitHealthy(url: string, timeoutMs = 30_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      const r = await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(2000) });
      if (r.status === 200) return;
    } catch { /* not yet */ }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${url} did not become healthy`);
}

/** Another app process on its own port, against the same database and services. */
export async function startApp(extraEnv: Record<string, string> = {}, fixedPort?: number): Promise<Proc & { url: string }> {
  const port = fixedPort ?? (await freePort());
  const p = spawnNode([path.join(stack().root, 'src/cli/serve.mjs')], { ...process.env, ...stack().appEnv, PORT: String(port), HOST: '127.0.0.1', ...extraEnv });
  const url = `http://127.0.0.1:${port}`;
  await waitHealthy(url);
  return Object.assign(p, { url });
}

/** Another outbox worker process. */
export function startWorker(extraEnv: Record<string, string> = {}): Proc {
  return spawnNode(['--import', 'tsx', path.join(stack().root, 'src/cli/worker.ts')], { ...process.env, ...stack().appEnv, WORKER_INTERVAL_MS: '200', ...extraEnv });
}

/**
 * A round-robin split on loopback: each request goes to the next target in turn. Targets
 * can be added after it starts (apps need its address to trust it).
 */
export async function roundRobin(targets: string[] = []): Promise<{ url: string; targets: string[]; hits: number[]; close: () => Promise<void> }> {
  const port = await freePort();
  const hits: number[] = [];
  let next = 0;
  const server = http.createServer((req, res) => {
    if (targets.length === 0) { res.writeHead(503); res.end(); return; }
    const i = next++ % targets.length;
    hits[i] = (hits[i] ?? 0) + 1;
    const target = new URL(targets[i]);
    const up = http.request({ hostname: target.hostname, port: target.port, path: req.url, method: req.method, headers: req.headers }, (r) => {
      res.writeHead(r.statusCode ?? 502, r.headers);
      r.pipe(res);
    });
    up.on('error', () => { res.writeHead(502); res.end(); });
    req.pipe(up);
  });
  await new Promise<void>((r) => server.listen(port, '127.0.0.1', () => r()));
  return { url: `http://127.0.0.1:${port}`, targets, hits, close: () => new Promise((r) => { server.closeAllConnections(); server.close(() => r()); }) };
}

/** Stops a process the stack started (by pid), as a crash or an operator would. */
export async function killPid(pid: number, signal: NodeJS.Signals = 'SIGKILL'): Promise<void> {
  try { process.kill(pid, signal); } catch { return; }
  for (let i = 0; i < 100; i++) {
    try { process.kill(pid, 0); } catch { return; }
    await new Promise((r) => setTimeout(r, 50));
  }
}
