import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn, watchConsole } from '../setup/browser';
import { stack } from '../setup/stack';
import { waitForMail } from '../setup/mail';
import { PASSWORD, confirmLink, makeCompany, uniqueEmail } from '../setup/factory';

let browser: Browser;
const base = () => stack().appUrl;

beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); });

const ROLES = [
  { email: 'owner@example.com', label: 'Owner', sees: ['Dashboard', 'Jobs', 'Customers', 'Members', 'Company settings'], hidden: [] as string[] },
  { email: 'bookkeeper@example.com', label: 'Bookkeeper', sees: ['Dashboard', 'Jobs', 'Customers'], hidden: ['Members', 'Company settings'] },
  { email: 'estimator@example.com', label: 'Estimator', sees: ['Dashboard', 'Jobs', 'Customers'], hidden: ['Members', 'Company settings'] },
  { email: 'crew@example.com', label: 'Crew lead', sees: ['Dashboard', 'Jobs'], hidden: ['Customers', 'Members', 'Company settings'] },
];

describe('signing in as each role', () => {
  for (const role of ROLES) {
    it(`${role.label} sees their navigation`, async () => {
      const ctx = await browser.newContext({ viewport: { width: 1280, height: 860 } });
      const page = await signIn(ctx, base(), role.email, stack().demoPassword);
      const problems = watchConsole(page);
      await expect.poll(() => page.getByTestId('whoami').textContent()).toContain(role.label);
      const nav = page.getByTestId('main-nav').locator('.hidden.md\\:block');
      for (const label of role.sees) expect(await nav.getByRole('link', { name: label, exact: true }).count(), label).toBe(1);
      for (const label of role.hidden) expect(await nav.getByRole('link', { name: label, exact: true }).count(), label).toBe(0);
      await shot(page, `role-${role.label.toLowerCase().replace(' ', '-')}-dashboard`);
      await page.goto(`${base()}/jobs`);
      await page.getByTestId('jobs-total').waitFor();
      await shot(page, `role-${role.label.toLowerCase().replace(' ', '-')}-jobs`);
      expect(problems.filter((p) => /Content Security Policy|Refused/.test(p))).toEqual([]);
      await ctx.close();
    });
  }

  it('a crew lead sees the work ahead: their won and building jobs, where each locate ticket stands, and a way to log hours', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 860 } });
    const page = await signIn(ctx, base(), 'crew@example.com', stack().demoPassword);
    const board = page.getByTestId('crew-board');
    await board.waitFor();
    // The selling stages are not a crew lead's: only won, building and completed are counted.
    const tiles = page.getByRole('region', { name: 'Your jobs' }).locator('li');
    expect(await tiles.allInnerTexts()).toEqual([expect.stringMatching(/^Won\s+\d+$/), expect.stringMatching(/^Building\s+\d+$/), expect.stringMatching(/^Completed\s+\d+$/)]);
    const count = async (label: string) => Number((await tiles.filter({ hasText: label }).innerText()).replace(/\D+/g, ''));
    const rows = board.getByTestId('crew-board-job');
    expect(await rows.count()).toBe((await count('Won')) + (await count('Building')));
    expect(await rows.count()).toBeGreaterThan(0);
    for (const pill of await board.getByTestId('crew-board-locate').allInnerTexts()) {
      expect(pill).toMatch(/^(No locate ticket on file|Ticket on file; wait for the marks|Ticket on file and current|Ticket expired)/);
    }
    const first = rows.first();
    const jobHref = await first.getByRole('link').first().getAttribute('href');
    expect(await first.getByRole('link', { name: 'Log hours' }).getAttribute('href')).toBe(`/time?job=${jobHref!.split('/').pop()}`);
    await shot(page, 'crew-dashboard-work-ahead');
    await ctx.close();
  });

  it('a crew lead on a phone reads the jobs as cards', async () => {
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const page = await signIn(ctx, base(), 'crew@example.com', stack().demoPassword);
    await page.goto(`${base()}/jobs`);
    await page.getByRole('list', { name: 'Jobs' }).waitFor();
    expect(await page.getByRole('list', { name: 'Jobs' }).locator('li').count()).toBeGreaterThan(0);
    await shot(page, 'phone-crew-jobs');
    await ctx.close();
  });

  it('refuses a wrong password with a clear message', async () => {
    const ctx = await browser.newContext();
    const page = await ctx.newPage();
    await page.goto(`${base()}/sign-in`);
    await hydrated(page);
    await page.getByLabel('E-mail').fill('estimator@example.com');
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect.poll(() => page.getByRole('alert').first().textContent()).toContain('do not match');
    await ctx.close();
  });
});

describe('signing up and signing in safely', () => {
  it('a new owner signs up, confirms the address from the mail, and lands in their company', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 860 } });
    const page = await ctx.newPage();
    const email = `e2e.owner.${Date.now().toString(36)}@tests.example`;
    await page.goto(`${base()}/sign-up`);
    await hydrated(page);
    await page.getByLabel('Company name').fill('Hollow Creek Fence');
    await page.getByLabel('Your name').fill('Dana Field');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill('a-good-long-password');
    await page.getByRole('button', { name: 'Create the company' }).click();
    await expect.poll(() => page.getByTestId('sign-up-sent').textContent()).toContain(email);
    await shot(page, 'sign-up-check-email');
    const mail = (await waitForMail(email)).find((m) => /Confirm your e-mail/.test(m.subject))!;
    const link = mail.text.match(/https?:\/\/\S+\/verify-email\?\S+/)![0];
    await page.goto(link);
    await page.waitForURL(`${base()}/`);
    await expect.poll(() => page.getByTestId('company-name').textContent()).toBe('Hollow Creek Fence');
    await shot(page, 'sign-up-confirmed-dashboard');
    await ctx.close();
  });

  it('an invited crew lead creates an account, confirms it from the mail, and joins', async () => {
    const co = await makeCompany();
    const email = uniqueEmail('e2e-crew');
    const inv = await co.owner.post('/api/members/invitations', { email, role: 'crew_lead' });
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const page = await ctx.newPage();
    await page.goto(`${base()}/accept-invite/${inv.body.id}`);
    await hydrated(page);
    await page.getByLabel('Your name').fill('Robin Post');
    await page.getByLabel('Password').fill('a-good-long-password');
    await page.getByRole('button', { name: 'Create account' }).click();
    await expect.poll(() => page.getByTestId('accept-invite-sent').textContent()).toContain(email);
    await shot(page, 'phone-accept-invite-check-email');
    await page.goto(await confirmLink(email));
    await page.waitForURL(`${base()}/accept-invite/${inv.body.id}`);
    await hydrated(page);
    await Promise.all([page.waitForURL(`${base()}/`), page.getByRole('button', { name: `Join ${co.name}` }).click()]);
    await page.getByTestId('crew-board').waitFor();
    await shot(page, 'phone-accept-invite-joined');
    await ctx.close();
  });

  it('a member changes their password on Your account; their other sessions end', async () => {
    const co = await makeCompany();
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 860 } });
    const page = await signIn(ctx, base(), co.emails.estimator, PASSWORD);
    await page.getByTestId('whoami').click();
    await page.waitForURL(`${base()}/account`);
    await hydrated(page);
    await page.getByLabel('Current password').fill(PASSWORD);
    await page.getByLabel('New password').fill('short');
    await page.getByRole('button', { name: 'Change the password' }).click();
    await page.locator('#newPassword-error').waitFor();
    await page.getByLabel('New password').fill('a-fresh-long-password');
    await page.getByRole('button', { name: 'Change the password' }).click();
    await expect.poll(() => page.getByRole('status').textContent()).toContain('signed out');
    await shot(page, 'account-password-changed');
    expect((await co.estimator.get('/api/jobs')).status).toBe(401);
    await page.goto(`${base()}/jobs`);
    expect(new URL(page.url()).pathname).toBe('/jobs');
    await ctx.close();
  });

  it('after sign-in a hostile ?next= keeps the browser on this site', async () => {
    const ctx = await browser.newContext();
    for (const next of ['/%5Cevil.example/x', '//evil.example/x', '/%09/evil.example', 'javascript:alert(1)']) {
      const page = await ctx.newPage();
      await page.goto(`${base()}/sign-in?next=${next}`);
      await hydrated(page);
      await page.getByLabel('E-mail').fill('bookkeeper@example.com');
      await page.getByLabel('Password').fill(stack().demoPassword);
      await Promise.all([page.waitForURL(`${base()}/`), page.getByRole('button', { name: 'Sign in' }).click()]);
      expect(new URL(page.url()).origin, next).toBe(base());
      await ctx.clearCookies();
      await page.close();
    }
    await ctx.close();
  });
});

describe('jobs through the form', () => {
  it('an estimator fails validation, sees the field error, then creates a job and finds it in the table', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'estimator@example.com', stack().demoPassword);
    const problems = watchConsole(page);
    await page.goto(`${base()}/jobs/new`);
    await hydrated(page);
    await page.getByRole('button', { name: 'Create the job' }).click();
    const titleError = page.locator('#title-error');
    await titleError.waitFor();
    expect(await titleError.textContent()).toContain('short title');
    expect(await page.locator('#customerId-error').textContent()).toContain('Choose the customer');
    await shot(page, 'job-form-errors');

    const title = `Cedar privacy ${Date.now().toString(36)}`;
    await page.getByLabel('Title').fill(title);
    await page.getByLabel('Customer').selectOption({ index: 1 });
    await page.getByLabel('Fence style').selectOption({ label: 'Wood privacy 6 ft' });
    await page.getByLabel('Street').fill('77 Heron Ln');
    await Promise.all([page.waitForURL(/\/jobs\/\d+$/), page.getByRole('button', { name: 'Create the job' }).click()]);
    expect(await page.getByTestId('job-title').textContent()).toBe(title);
    await shot(page, 'job-created');

    await page.goto(`${base()}/jobs`);
    await hydrated(page);
    await page.getByPlaceholder('Job code, title, customer, street or town').fill(title);
    await expect.poll(() => page.getByTestId('jobs-total').textContent(), { timeout: 10_000 }).toBe('1 job');
    expect(await page.getByRole('cell', { name: title }).count()).toBe(1);
    await shot(page, 'jobs-search');
    expect(problems.filter((p) => /Content Security Policy|Refused/.test(p))).toEqual([]);
    await ctx.close();
  });

  it('sorts and filters the table', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    await page.goto(`${base()}/jobs`);
    await hydrated(page);
    await page.locator('fieldset').getByText('Closed', { exact: true }).click();
    await expect.poll(() => page.url()).toContain('status=closed');
    const pills = await page.locator('tbody .pill').allTextContents();
    expect(pills.length).toBeGreaterThan(0);
    expect(new Set(pills)).toEqual(new Set(['Closed']));
    await page.getByRole('button', { name: /^Customer/ }).click();
    await expect.poll(() => page.url()).toContain('sort=customer');
    await ctx.close();
  });
});
