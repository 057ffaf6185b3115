#!/usr/bin/env node
// Serves the built app. Astro's Node adapter takes the client address from X-Forwarded-For
// whenever it is present, so this wrapper drops forwarding headers unless the connection
// comes from a proxy listed in TRUSTED_PROXIES. Rate limits then count real addresses.
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

process.env.ASTRO_NODE_AUTOSTART = 'disabled';
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const outDir = process.env.TALLYPOST_BUILD_DIR ?? path.join(root, 'dist');
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

const port = Number(process.env.PORT ?? 4321);
const host = process.env.HOST ?? '127.0.0.1';
server.listen(port, host, () => console.log(`Tallypost listening on http://${host}:${port}`));

for (const sig of ['SIGINT', 'SIGTERM']) {
  process.on(sig, () => {
    server.close(() => process.exit(0));
    setTimeout(() => process.exit(0), 5_000).unref();
  });
}
