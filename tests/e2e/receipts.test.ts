import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn, watchConsole } from '../setup/browser';
import { stack } from '../setup/stack';
import { closeTestDb, testDb } from '../setup/db';

let browser: Browser;
const base = () => stack().appUrl;
const cents = (text: string | null) => Math.round(Number((text ?? '').replace(/[$,\s]/g, '')) * 100);
const money = (c: number) => new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' }).format(c / 100);

beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); await closeTestDb(); });

describe('a bookkeeper imports a supplier’s receipts', () => {
  it('uploads a sample file, maps columns, watches the progress, fixes a row, commits, allocates a line, and sees the job’s cost move', async () => {
    const job = await testDb()('jobs').where({ organization_id: 'org_demo_thornbury_000000000001', code: 'J-0154' }).first('id');
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'bookkeeper@example.com', stack().demoPassword);
    const problems = watchConsole(page);

    await page.goto(`${base()}/jobs/${job.id}`);
    const before = cents(await page.getByTestId('actual-material').textContent());

    await page.goto(`${base()}/receipts`);
    await hydrated(page);
    // Record every state the progress bars pass through.
    await page.evaluate(() => {
      const seen: string[] = [];
      (window as unknown as { progressSeen: string[] }).progressSeen = seen;
      new MutationObserver(() => {
        for (const bar of document.querySelectorAll('[role=progressbar]')) seen.push(`${bar.getAttribute('aria-label')}:${bar.getAttribute('aria-valuenow')}`);
      }).observe(document.body, { subtree: true, childList: true, attributes: true });
    });
    await page.getByLabel('CSV files to import').setInputFiles(path.join(stack().root, 'tests/fixtures/receipts/cedar-hollow-lumber.csv'));
    await page.getByRole('button', { name: /Upload and check/ }).waitFor();
    expect(await page.getByText('The mapping saved for Cedar Hollow Lumber.').count()).toBe(1);
    await shot(page, 'receipts-1-mapping');

    // Map the columns by hand: the amount, the memo and the date format.
    await page.getByLabel('Column for Line amount').selectOption('Ext Price');
    await page.getByLabel('Column for Memo').selectOption('Memo');
    await page.getByLabel('Dates are written').selectOption('mdy');
    await page.getByRole('button', { name: /Upload and check/ }).click();
    await page.getByTestId('import-preview').waitFor();
    const seen = await page.evaluate(() => (window as unknown as { progressSeen: string[] }).progressSeen);
    expect(seen.some((s) => /^Read \d+ rows:100$/.test(s))).toBe(true);
    expect(seen.some((s) => s.startsWith('Uploading:'))).toBe(true);
    expect(await page.getByTestId('preview-errors').textContent()).toBe('1');
    await shot(page, 'receipts-2-preview');

    // The flagged row: November has no 31st.
    await page.getByText('Row 6: date: "11/31/2026" is not a US month/day/year date').waitFor();
    await page.getByRole('button', { name: 'Fix row 6' }).click();
    await page.getByLabel('Invoice Date', { exact: true }).fill('11/30/2026');
    await page.getByRole('button', { name: 'Check the row again' }).click();
    await expect.poll(() => page.getByTestId('preview-errors').textContent(), { timeout: 15_000 }).toBe('0');
    await shot(page, 'receipts-3-fixed');

    await page.getByRole('button', { name: /^Commit \d+ receipt lines$/ }).click();
    const result = page.getByTestId('commit-result');
    await result.waitFor();
    expect(await result.textContent()).toContain('Added 6 lines ($983.64)');
    await shot(page, 'receipts-4-committed');

    await result.getByRole('link', { name: /Allocate 2 unmatched lines/ }).click();
    await page.waitForURL(/\/receipts\/allocate\?importId=\d+/);
    await hydrated(page);
    const row = page.locator('tr', { hasText: '2x4x8 treated rail' });
    await row.waitFor();
    expect(await row.textContent()).toContain('Memo: for the Orchard Way job');
    const option = await row.getByLabel(/^Job for row/).locator('option', { hasText: 'J-0154' }).getAttribute('value');
    await row.getByLabel(/^Job for row/).selectOption(option!);
    await row.getByLabel(/^Category for row/).selectOption('material');
    await row.getByRole('button', { name: 'Allocate' }).click();
    await page.getByText(/allocated to J-0154 \$98\.88/).waitFor();
    await shot(page, 'receipts-5-allocated');

    await page.goto(`${base()}/jobs/${job.id}`);
    const after = cents(await page.getByTestId('actual-material').textContent());
    // PO 154 lines 258.30 + 595.00 + 55.00, the return −52.50, and the allocated 98.88
    expect(after - before).toBe(25830 + 59500 + 5500 - 5250 + 9888);
    expect(await page.getByTestId('actual-material').textContent()).toBe(money(after));
    await page.locator('tr[data-category=material] summary').click();
    await shot(page, 'receipts-6-job-costs');
    expect(problems.filter((p) => /Content Security Policy|Refused|error/i.test(p))).toEqual([]);
    await ctx.close();
  });

  it('on a phone, a crew lead logs the crew’s hours and sees no money', async () => {
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const page = await signIn(ctx, base(), 'crew@example.com', stack().demoPassword);
    await page.goto(`${base()}/time`);
    await hydrated(page);
    await page.locator('label', { has: page.locator('input[value=dig_set_posts]') }).click();
    const worker = page.locator('li', { hasText: 'your crew' }).first();
    await worker.getByRole('checkbox').check();
    await worker.getByRole('textbox').fill('6.5');
    await page.getByRole('button', { name: /Save 1 worker/ }).click();
    await page.getByText(/Saved 1 entry: 6.5 h of dig and set posts/).waitFor();
    expect(await page.locator('body').textContent()).not.toMatch(/\$\d/);
    await shot(page, 'phone-crew-time');
    await ctx.close();
  });
});
