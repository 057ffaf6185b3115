import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn, tabTo } from '../setup/browser';
import { stack } from '../setup/stack';
import { closeTestDb, testDb } from '../setup/db';

let browser: Browser;
const base = () => stack().appUrl;
beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); await closeTestDb(); });

describe('with the keyboard alone', () => {
  it('a bookkeeper imports a CSV', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'bookkeeper@example.com', stack().demoPassword);
    await page.goto(`${base()}/receipts`);
    await hydrated(page);
    await tabTo(page, /CSV files to import/);
    const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.keyboard.press('Space')]);
    await chooser.setFiles(path.join(stack().root, 'tests/fixtures/receipts/kettle-rock-ready-mix.csv'));
    await page.getByRole('button', { name: /Upload and check/ }).waitFor();
    // The semicolon-separated file is read with its own delimiter and its saved mapping.
    await page.getByText('Separated by semicolons.', { exact: false }).waitFor();
    await tabTo(page, /Upload and check/);
    await page.keyboard.press('Enter');
    await page.getByTestId('import-preview').waitFor({ timeout: 30_000 });
    await tabTo(page, /^Commit \d+ receipt lines/);
    await page.keyboard.press('Enter');
    const result = page.getByTestId('commit-result');
    await result.waitFor({ timeout: 30_000 });
    expect(await result.textContent()).toMatch(/Added \d+ lines/);
    await shot(page, 'keyboard-import');
    await ctx.close();
  });

  it('the owner issues and sends an invoice', async () => {
    const draft = await testDb()('invoices as i')
      .join('customers as c', 'c.id', 'i.customer_id')
      .where({ 'i.organization_id': 'org_demo_thornbury_000000000001', 'i.status': 'draft' })
      .whereNotNull('c.email')
      .first('i.id');
    expect(draft, 'the demo has a draft invoice to send').toBeTruthy();
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    await page.goto(`${base()}/invoices/${draft.id}`);
    await hydrated(page);
    await tabTo(page, /^Issue and send$/);
    await Promise.all([page.waitForLoadState('load'), page.keyboard.press('Enter')]);
    await expect.poll(async () => (await testDb()('invoices').where('id', draft.id).first('status', 'sent_at')).sent_at !== null, { timeout: 20_000 }).toBe(true);
    await shot(page, 'keyboard-invoice-sent');
    await ctx.close();
  });
});
