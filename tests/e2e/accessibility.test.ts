import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn } from '../setup/browser';
import { seriousViolations } from '../setup/a11y';
import { stack } from '../setup/stack';

let browser: Browser;
const base = () => stack().appUrl;

beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); });

/** The main pages, each checked with axe-core (deque's open-source rules, WCAG 2 A/AA). */
const PAGES: { path: string; as: string }[] = [
  { path: '/', as: 'owner@example.com' },
  { path: '/jobs', as: 'owner@example.com' },
  { path: '/jobs/new', as: 'estimator@example.com' },
  { path: '/jobs/1', as: 'owner@example.com' },
  { path: '/customers', as: 'bookkeeper@example.com' },
  { path: '/customers/1', as: 'owner@example.com' },
  { path: '/settings', as: 'owner@example.com' },
  { path: '/settings/members', as: 'owner@example.com' },
  { path: '/settings/permissions', as: 'crew@example.com' },
  { path: '/jobs/1/bids/new', as: 'estimator@example.com' },
  { path: '/pricebook', as: 'estimator@example.com' },
  { path: '/styles', as: 'estimator@example.com' },
  { path: '/styles/1', as: 'estimator@example.com' },
  { path: '/rates', as: 'estimator@example.com' },
  { path: '/invoices', as: 'owner@example.com' },
  { path: '/invoices/1', as: 'owner@example.com' },
  { path: '/invoices/new', as: 'bookkeeper@example.com' },
  { path: '/receivables', as: 'bookkeeper@example.com' },
  { path: '/settings/reminders', as: 'owner@example.com' },
  { path: '/receipts', as: 'bookkeeper@example.com' },
  { path: '/receipts/allocate', as: 'bookkeeper@example.com' },
  { path: '/costs', as: 'bookkeeper@example.com' },
  { path: '/workers', as: 'bookkeeper@example.com' },
  { path: '/time', as: 'crew@example.com' },
  { path: '/time/rentals', as: 'crew@example.com' },
  { path: '/margins', as: 'owner@example.com' },
  { path: '/wip', as: 'bookkeeper@example.com' },
  { path: '/calibration', as: 'estimator@example.com' },
  { path: '/account', as: 'crew@example.com' },
];
const PUBLIC = ['/sign-in', '/sign-up', '/forgot-password'];

describe('accessibility', () => {
  it('has no serious or critical axe-core violations on the main pages', async () => {
    const found: string[] = [];
    for (const path of PUBLIC) {
      const ctx = await browser.newContext({ bypassCSP: true });
      const page = await ctx.newPage();
      await page.goto(`${base()}${path}`);
      await hydrated(page);
      for (const v of await seriousViolations(page)) found.push(`${path}: ${v.id} (${v.impact}) ${v.help} at ${v.targets.join(', ')}`);
      await ctx.close();
    }
    const byUser = new Map<string, typeof PAGES>();
    for (const p of PAGES) byUser.set(p.as, [...(byUser.get(p.as) ?? []), p]);
    for (const [email, pages] of byUser) {
      const ctx = await browser.newContext({ bypassCSP: true, viewport: { width: 1280, height: 900 } });
      const page = await signIn(ctx, base(), email, stack().demoPassword);
      for (const { path } of pages) {
        await page.goto(`${base()}${path}`);
        await hydrated(page);
        for (const v of await seriousViolations(page)) found.push(`${path}: ${v.id} (${v.impact}) ${v.help} at ${v.targets.join(', ')}`);
      }
      await ctx.close();
    }
    console.log(`axe-core: ${PUBLIC.length + PAGES.length} pages, ${found.length} serious or critical violations`);
    expect(found).toEqual([]);
  }, 600_000); // 32 pages: over 3 minutes on a busy two-core machine

  it('signs in and creates a job with the keyboard alone', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await page.goto(`${base()}/sign-in`);
    await hydrated(page);
    await page.locator('#email').focus();
    await page.keyboard.type('estimator@example.com');
    await page.keyboard.press('Tab');
    await page.keyboard.type(stack().demoPassword);
    await Promise.all([page.waitForURL(`${base()}/`), page.keyboard.press('Enter')]);
    await page.goto(`${base()}/jobs/new`);
    await hydrated(page);
    await page.locator('#title').focus();
    const title = `Keyboard job ${Date.now().toString(36)}`;
    await page.keyboard.type(title);
    await page.keyboard.press('Tab'); // job code
    await page.keyboard.press('Tab'); // customer
    await page.keyboard.press('ArrowDown');
    await page.locator('#notes').focus();
    await page.keyboard.type('Typed without a mouse.');
    await page.keyboard.press('Tab'); // the submit button follows the notes
    expect(await page.evaluate(() => document.activeElement?.textContent)).toBe('Create the job');
    await Promise.all([page.waitForURL(/\/jobs\/\d+$/), page.keyboard.press('Enter')]);
    expect(await page.getByTestId('job-title').textContent()).toBe(title);
    await shot(page, 'keyboard-job');
    await ctx.close();
  });
});
