import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn, watchConsole } from '../setup/browser';
import { stack } from '../setup/stack';
import { formatMoney } from '../../src/lib/format';

let browser: Browser;
const base = () => stack().appUrl;

beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); });

/** Pixels a chart has drawn on its canvas (a blank canvas has none). */
async function inked(page: Page, testId: string): Promise<number> {
  return page.getByTestId(testId).locator('canvas').evaluate((c: HTMLCanvasElement) => {
    const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
    let n = 0;
    for (let i = 3; i < d.length; i += 4) if (d[i] > 0) n++;
    return n;
  });
}

describe('the owner reads margins by style', () => {
  it('sees each chart drawn with the table of its numbers beside it, and filters them', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    const problems = watchConsole(page);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Margins by style' }).first().click();
    await page.waitForURL(/\/margins$/);
    await hydrated(page);
    const api = await (await page.request.get(`${base()}/api/reports/margin-by-style`)).json();
    expect(api.styles.length).toBeGreaterThanOrEqual(5);

    for (const id of ['chart-margin', 'chart-cost', 'chart-months', 'chart-scatter']) {
      await expect.poll(() => inked(page, `${id}-chart`), { timeout: 10_000 }).toBeGreaterThan(2000);
      expect(await page.getByTestId(`${id}-chart`).locator('canvas').getAttribute('aria-label')).toMatch(/numbers are in the table beside it/);
      expect(await page.getByTestId(`${id}-table`).locator('tbody tr').count(), id).toBeGreaterThan(1);
    }
    // The table beside the margin chart carries the same numbers as the endpoint.
    const wood = api.styles.find((s: { styleName: string }) => s.styleName === 'Wood privacy 6 ft');
    const row = page.getByTestId('chart-margin-table').locator('tr', { hasText: 'Wood privacy 6 ft' });
    expect(await row.locator('td').nth(1).textContent()).toBe(`${wood.estimatedMarginPct.toFixed(1)} %`);
    expect(await row.locator('td').nth(2).textContent()).toBe(`${wood.marginPct.toFixed(1)} %`);
    // The story the demo tells: wood privacy earned less than its bids planned.
    expect(wood.marginPct).toBeLessThan(wood.estimatedMarginPct - 2);
    expect(await page.getByTestId('total-revenue').textContent()).toBe(formatMoney(api.total.revenueCents));
    const styleRow = page.getByTestId('style-table').locator('tr[data-style="Wood privacy 6 ft"]');
    expect(await styleRow.textContent()).toContain(formatMoney(wood.grossProfitPerFtCents));
    await shot(page, 'margins-by-style');

    // Filter to one style: charts, tables, the address and the exports follow.
    await page.getByTestId('report-filters').locator('summary', { hasText: 'Styles:' }).click();
    await page.getByRole('checkbox', { name: 'Chain link 4 ft' }).check();
    await expect.poll(() => page.getByTestId('style-table').locator('tbody tr').count()).toBe(2);
    expect(page.url()).toMatch(/style=\d+/);
    expect(await page.getByRole('link', { name: 'Export CSV' }).first().getAttribute('href')).toMatch(/style=\d+.*format=csv/);
    const chainApi = await (await page.request.get(`${base()}/api/reports/margin-by-style?${new URL(page.url()).searchParams}`)).json();
    expect(await page.getByTestId('total-revenue').textContent()).toBe(formatMoney(chainApi.total.revenueCents));
    await page.keyboard.press('Escape');
    await shot(page, 'margins-by-style-chain-link');
    expect(await page.content()).not.toContain('NaN');
    expect(problems).toEqual([]);
    await ctx.close();
  });

  it('reads on a phone, and the bookkeeper sees work in progress with its totals', async () => {
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    await page.goto(`${base()}/margins`);
    await hydrated(page);
    await expect.poll(() => inked(page, 'chart-margin-chart')).toBeGreaterThan(1000);
    await shot(page, 'margins-by-style-phone');
    await page.goto(`${base()}/`);
    await page.getByTestId('margin-tiles').waitFor();
    expect(await page.getByTestId('quarter-margin').textContent()).toMatch(/%|—/);
    await shot(page, 'dashboard-margin-tiles-phone');
    // The dashboard's best and worst styles are the ones the margins screen names over the same twelve months.
    const best = await page.getByTestId('margin-tiles').getByTestId('best-style').textContent();
    const worst = await page.getByTestId('margin-tiles').getByTestId('worst-style').textContent();
    expect(best).toBeTruthy();
    await page.getByTestId('best-worst').click();
    await page.waitForURL(/\/margins\?from=\d{4}-\d{2}-\d{2}&to=\d{4}-\d{2}-\d{2}$/);
    await hydrated(page);
    expect(await page.getByTestId('margins-screen').getByTestId('best-style').textContent()).toBe(best);
    expect(await page.getByTestId('margins-screen').getByTestId('worst-style').textContent()).toBe(worst);
    await ctx.close();

    const bctx = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const books = await signIn(bctx, base(), 'bookkeeper@example.com', stack().demoPassword);
    await books.goto(`${base()}/wip`);
    await hydrated(books);
    const wip = await (await books.request.get(`${base()}/api/reports/wip`)).json();
    expect(wip.jobs.length).toBeGreaterThan(0);
    expect(await books.getByTestId('wip-earned').textContent()).toBe(formatMoney(wip.totals.earnedCents));
    expect(await books.getByTestId('wip-table').locator('tbody tr').count()).toBe(wip.jobs.length);
    // Each job's estimated total cost is the one its percent complete divides by.
    // (A job with neither an estimate nor a cost yet, which another browser test may have made, is 0 % along.)
    for (const j of wip.jobs) expect(j.percentComplete).toBeCloseTo(j.projectedCostCents > 0 ? Math.round((j.costToDateCents / j.projectedCostCents) * 1000) / 10 : 0, 5);
    expect(await books.getByTestId('wip-method').textContent()).toMatch(/cost to date ÷ the estimated total cost/);
    await shot(books, 'work-in-progress');
    await bctx.close();
  });
});
