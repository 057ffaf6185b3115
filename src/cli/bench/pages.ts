import { readdirSync, readFileSync } from 'node:fs';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { chromium } from 'playwright-core';

export interface PageWeight {
  page: string;
  path: string;
  scripts: number;
  gzipBytes: number;
}

/**
 * The JavaScript a page ships: every script the browser fetches while the page loads and
 * its islands hydrate, each gzipped at level 9 as a CDN or reverse proxy would serve it.
 */
export async function pageWeights(baseUrl: string, cookie: string, pages: { page: string; path: string }[]): Promise<PageWeight[]> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'tallypost-bench-chromium-'));
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
  });
  try {
    const out: PageWeight[] = [];
    const host = new URL(baseUrl).hostname;
    const [name, ...rest] = cookie.split(';')[0].split('=');
    for (const p of pages) {
      const ctx = await browser.newContext();
      await ctx.addCookies(cookie ? [{ name, value: rest.join('='), domain: host, path: '/' }] : []);
      const page = await ctx.newPage();
      const bodies = new Map<string, Buffer>();
      page.on('response', async (res) => {
        if (res.request().resourceType() !== 'script') return;
        try { bodies.set(res.url(), await res.body()); } catch { /* navigated away */ }
      });
      await page.goto(`${baseUrl}${p.path}`, { waitUntil: 'networkidle' });
      await page.waitForTimeout(500);
      const gz = [...bodies.values()].reduce((s, b) => s + gzipSync(b, { level: 9 }).length, 0);
      out.push({ page: p.page, path: p.path, scripts: bodies.size, gzipBytes: gz });
      await ctx.close();
    }
    return out;
  } finally {
    await browser.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * What a page with one empty React island ships: Astro's React renderer chunk (React and
 * react-dom's client) and the smallest island chunk, read from the build.
 */
export function emptyIslandBaseline(outDir: string): { gzipBytes: number; files: string[] } {
  const dir = path.join(outDir, 'client', '_astro');
  const js = readdirSync(dir).filter((f) => f.endsWith('.js'));
  const renderer = js.filter((f) => /^client\..*\.js$/.test(f));
  const island = js.filter((f) => /^SignOutButton\..*\.js$/.test(f));
  const jsx = js.filter((f) => /^jsx-runtime\..*\.js$/.test(f));
  const files = [...renderer, ...island, ...jsx];
  const gzipBytes = files.reduce((s, f) => s + gzipSync(readFileSync(path.join(dir, f)), { level: 9 }).length, 0);
  return { gzipBytes, files };
}
