import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

const SHOTS = path.resolve(path.dirname(new URL(import.meta.url).pathname), '../../reports/screenshots');

let dataDir: string | undefined;

/** Debian's Chromium, headless, with no network chatter of its own. Never a downloaded browser. */
export async function launch(): Promise<Browser> {
  dataDir = mkdtempSync(path.join(os.tmpdir(), 'tallypost-chromium-'));
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage',
    ],
  });
}

export async function closeBrowser(b: Browser | undefined): Promise<void> {
  await b?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
}

/** Saves a screenshot under reports/screenshots for people to look at. */
export async function shot(page: Page, name: string): Promise<void> {
  mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

/** Collects console errors and CSP violations, which a page must not produce. */
export function watchConsole(page: Page): string[] {
  const problems: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(m.text());
  });
  page.on('pageerror', (e) => problems.push(e.message));
  return problems;
}

/**
 * Waits until the page's islands have hydrated (Astro drops the ssr attribute). Islands
 * that hydrate only when scrolled into view or on a media query are left out.
 */
export async function hydrated(page: Page): Promise<void> {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]:not([client="visible"]):not([client="media"]):not([client="only"])').length === 0, undefined, { timeout: 15_000 });
}

/** Session cookies of people already signed in through the form in this test file. */
const sessions = new Map<string, Awaited<ReturnType<BrowserContext['storageState']>>['cookies']>();

/**
 * Signs in through the form the first time for each person in a test file, then reuses
 * that session (as a browser that stays signed in would), so the suite stays well under
 * the sign-in rate limit.
 */
export async function signIn(context: BrowserContext, baseUrl: string, email: string, password: string): Promise<Page> {
  const known = sessions.get(`${baseUrl} ${email}`);
  if (known) {
    await context.addCookies(known);
    const page = await context.newPage();
    await page.goto(`${baseUrl}/`);
    if (new URL(page.url()).pathname === '/') return page;
    sessions.delete(`${baseUrl} ${email}`);
    await page.close();
  }
  const page = await context.newPage();
  await page.goto(`${baseUrl}/sign-in`);
  await hydrated(page);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([page.waitForURL(`${baseUrl}/`), page.getByRole('button', { name: 'Sign in' }).click()]);
  sessions.set(`${baseUrl} ${email}`, (await context.storageState()).cookies);
  return page;
}

/**
 * Presses Tab until the focused element's accessible text matches, as a keyboard user
 * would; fails if it is never reached. Returns the number of presses.
 */
export async function tabTo(page: Page, match: RegExp, maxPresses = 250): Promise<number> {
  for (let i = 1; i <= maxPresses; i++) {
    await page.keyboard.press('Tab');
    const label = await page.evaluate(() => {
      const el = document.activeElement as HTMLElement | null;
      if (!el) return '';
      const id = el.getAttribute('id');
      const byFor = id ? document.querySelector(`label[for="${id}"]`)?.textContent : '';
      return [el.getAttribute('aria-label'), byFor, el.closest('label')?.textContent, el.textContent].filter(Boolean).join(' | ').trim();
    });
    if (match.test(label)) return i;
  }
  throw new Error(`Tab never reached an element matching ${match}`);
}
