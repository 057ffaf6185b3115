#!/usr/bin/env node
// Serves the built app (Astro's Node adapter, standalone: its handler serves the static
// files and renders the rest).
// - The adapter takes the client address from X-Forwarded-For whenever it is present, so
//   forwarding headers are dropped unless the connection comes from a proxy listed in
//   TRUSTED_PROXIES. Rate limits then count real addresses.
// - WEB_CONCURRENCY > 1 runs that many processes behind one port (node:cluster). They share
//   nothing but the database, as separate machines behind a load balancer would.
import cluster from 'node:cluster';
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const outDir = process.env.TALLYPOST_BUILD_DIR ?? path.join(root, 'dist');
const port = Number(process.env.PORT ?? 4321);
const host = process.env.HOST ?? '127.0.0.1';
const processes = Math.max(1, Number(process.env.WEB_CONCURRENCY ?? 1) || 1);

// Refuse to start half configured (src/server/env.ts): before listening, not at the first
// request, which is when the built app would first read its environment.
if (cluster.isPrimary) {
  const { tsImport } = await import('tsx/esm/api');
  const { assertReadyToServe } = await tsImport('../server/env.ts', import.meta.url);
  try {
    assertReadyToServe();
  } catch (err) {
    console.error(`[serve] ${err.message}`);
    process.exit(1);
  }
}

if (cluster.isPrimary && processes > 1) {
  let stopping = false;
  for (let i = 0; i < processes; i++) cluster.fork();
  cluster.on('exit', (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    console.error(`[serve] process ${worker.process.pid} ended (${signal ?? code}); starting another`);
    cluster.fork();
  });
  for (const sig of ['SIGINT', 'SIGTERM']) {
    process.on(sig, () => {
      stopping = true;
      for (const w of Object.values(cluster.workers ?? {})) w?.process.kill('SIGTERM');
      setTimeout(() => process.exit(0), 6_000).unref();
    });
  }
  console.log(`Tallypost listening on http://${host}:${port} (${processes} processes)`);
} else {
  await serve();
}

async function serve() {
  process.env.ASTRO_NODE_AUTOSTART = 'disabled';
  const { handler } = await import(pathToFileURL(path.join(outDir, 'server/entry.mjs')).href);
  const trusted = new Set((process.env.TRUSTED_PROXIES ?? '').split(',').map((s) => s.trim()).filter(Boolean));
  const FORWARDING = ['x-forwarded-for', 'x-forwarded-host', 'x-forwarded-proto', 'x-forwarded-port', 'x-real-ip', 'forwarded'];
  const server = http.createServer((req, res) => {
    const peer = (req.socket.remoteAddress ?? '').replace(/^::ffff:/, '');
    if (!trusted.has(peer)) for (const h of FORWARDING) delete req.headers[h];
    handler(req, res);
  });
  server.headersTimeout = 20_000;
  server.requestTimeout = 300_000;
  server.keepAliveTimeout = 5_000;
  server.listen(port, host, () => {
    if (!cluster.isWorker) console.log(`Tallypost listening on http://${host}:${port}`);
  });

  for (const sig of ['SIGINT', 'SIGTERM']) {
    process.on(sig, () => {
      server.close(() => process.exit(0));
      setTimeout(() => process.exit(0), 5_000).unref();
    });
  }
}
