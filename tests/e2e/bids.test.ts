import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn, watchConsole } from '../setup/browser';
import { stack } from '../setup/stack';

let browser: Browser;
const base = () => stack().appUrl;

beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); });

const text = async (page: Page, id: string) => (await page.getByTestId(id).textContent()) ?? '';

describe('an estimator bids a demo lead', () => {
  it('enters two connected runs and a gate, watches the takeoff and price follow, saves and accepts, and the job shows its estimate', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const page = await signIn(ctx, base(), 'estimator@example.com', stack().demoPassword);
    const problems = watchConsole(page);
    await page.goto(`${base()}/jobs?status=lead&sort=code&dir=desc`);
    await hydrated(page);
    await page.locator('tbody a').first().click();
    await page.waitForURL(/\/jobs\/\d+$/);
    const jobUrl = page.url();
    await page.getByTestId('bids-panel').getByRole('link', { name: /Build a bid|New bid version/ }).click();
    await page.waitForURL(/\/bids\/new/);
    await hydrated(page);

    await page.getByLabel('Fence style').selectOption({ label: 'Wood privacy 6 ft' });
    const runsTable = page.getByRole('table', { name: 'Runs' });
    while ((await runsTable.getByRole('button', { name: 'Remove' }).count()) > 0) await runsTable.getByRole('button', { name: 'Remove' }).last().click();
    const gatesTable = page.getByRole('table', { name: 'Gates' });
    while ((await gatesTable.count()) > 0 && (await gatesTable.getByRole('button', { name: 'Remove' }).count()) > 0) await gatesTable.getByRole('button', { name: 'Remove' }).first().click();

    await page.getByLabel('Run 1 length in feet').fill('40');
    await page.getByLabel('Run 1 height in inches').fill('72');
    await expect.poll(() => text(page, 'takeoff-posts')).toMatch(/^6 \(2 end, 0 corner, 4 line, 0 gate\)/);
    const priceOne = await text(page, 'bid-price');
    await shot(page, 'bids-builder-one-run');

    await page.getByRole('button', { name: 'Add a run' }).click();
    await page.getByLabel('Run 2 length in feet').fill('30');
    await page.getByLabel('Run 2 height in inches').fill('72');
    await expect.poll(() => text(page, 'takeoff-posts')).toMatch(/^10 \(2 end, 1 corner, 7 line, 0 gate\)/);
    const priceTwo = await text(page, 'bid-price');
    expect(priceTwo).not.toBe(priceOne);

    await page.getByRole('button', { name: 'Add a gate' }).click();
    await expect.poll(() => text(page, 'takeoff-posts')).toMatch(/^11 \(2 end, 1 corner, 6 line, 2 gate\)/);
    expect(await text(page, 'takeoff-gates')).toContain('1 single');
    const priceGate = await text(page, 'bid-price');
    expect(priceGate).not.toBe(priceTwo);
    expect(await page.getByTestId('bid-lines').locator('tbody tr').count()).toBeGreaterThan(5);
    expect(await text(page, 'bid-lines')).toMatch(/4×4 treated post/);
    expect(Number(await text(page, 'labour-hours'))).toBeGreaterThan(0);
    expect(await text(page, 'rental-days')).toMatch(/day/);
    expect(await page.getByTestId('plan-sketch').locator('rect').count()).toBeGreaterThanOrEqual(11);

    // A bad entry shows a field error, not NaN; putting it back restores the price.
    await page.getByLabel('Gate 1 width in feet').fill('40');
    await expect.poll(() => page.locator('[id="gates.0.widthFt-error"]').textContent()).toMatch(/wider than its run/);
    expect(await page.content()).not.toContain('NaN');
    await shot(page, 'bids-builder-field-error');
    await page.getByLabel('Gate 1 width in feet').fill('4');
    await expect.poll(() => text(page, 'bid-price')).toBe(priceGate);

    await page.getByLabel('Target margin percent').fill('35');
    await expect.poll(() => text(page, 'bid-margin')).toMatch(/^3[45]\.\d %/);
    const finalPrice = await text(page, 'bid-price');
    await shot(page, 'bids-builder-two-runs-and-a-gate');

    await page.getByRole('button', { name: /Save as version \d+/ }).click();
    await expect.poll(() => text(page, 'saved-status')).toMatch(/Version \d+ saved · draft/);
    await page.getByRole('button', { name: /Accept version \d+/ }).click();
    await expect.poll(() => text(page, 'saved-status')).toMatch(/accepted/);
    await shot(page, 'bids-builder-accepted');

    await page.goto(jobUrl);
    await page.getByTestId('estimated-costs').waitFor();
    for (const c of ['material', 'labour', 'rental', 'permit']) expect(await text(page, `estimate-${c}`), c).toMatch(/^\$/);
    expect(await text(page, 'estimate-material')).not.toBe('$0.00');
    expect(await text(page, 'contract-price')).toBe(finalPrice);
    await shot(page, 'bids-job-with-estimate');

    await page.getByTestId('bids-panel').getByRole('link', { name: 'Print' }).first().click();
    await page.getByTestId('printable-bid').waitFor();
    expect(await text(page, 'print-price')).toBe(finalPrice);
    expect(await text(page, 'printable-bid')).toMatch(/811/);
    expect(await text(page, 'printable-bid')).toMatch(/Property lines are the owner's responsibility/);
    // The whole title stays in the head: nothing of it spills onto the printed page.
    expect(await page.title()).toMatch(/^Bid J-\d+-\d+ · .+/);
    expect((await page.locator('body').innerText()).trim()).toMatch(/^← Back to version/);
    await shot(page, 'bids-printable');
    expect(problems.filter((p) => /Content Security Policy|Refused|NaN/.test(p))).toEqual([]);
    await ctx.close();
  });

  it('flags a scope carried over from the last version once the fence changes, and can clear it', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const page = await signIn(ctx, base(), 'estimator@example.com', stack().demoPassword);
    const styles = await (await page.request.get(`${base()}/api/styles`)).json();
    const woodId = styles.items.find((s: { name: string }) => s.name === 'Wood privacy 6 ft').id;
    const customers = await (await page.request.get(`${base()}/api/customers`)).json();
    const created = await page.request.post(`${base()}/api/jobs`, {
      data: { title: 'Side yard privacy', customerId: customers.items[0].id, fenceStyleId: woodId, status: 'measured' },
      headers: { origin: base() },
    });
    expect(created.status()).toBe(201);
    const jobId = (await created.json()).id;
    const scope = 'Supply and install 64 ft of wood privacy fence with one walk gate.';
    const v1 = await page.request.post(`${base()}/api/jobs/${jobId}/bids`, {
      data: { styleId: woodId, scope, runs: [{ lengthFt: 64, heightIn: 72, label: 'Side' }], gates: [{ runIndex: 0, widthFt: 4 }], target: { mode: 'margin', pct: 32 } },
      headers: { origin: base() },
    });
    expect(v1.status()).toBe(201);
    await page.goto(`${base()}/jobs/${jobId}`);
    await page.getByTestId('bids-panel').getByRole('link', { name: 'New bid version' }).click();
    await page.waitForURL(/\/bids\/new/);
    await hydrated(page);
    const box = page.getByLabel('Scope of work');
    expect(await box.inputValue()).toBe(scope);
    expect(await page.getByTestId('scope-stale').count()).toBe(0);
    await page.getByLabel('Run 1 length in feet').fill('80');
    await expect.poll(() => text(page, 'scope-stale')).toContain('(Wood privacy 6 ft, 64 ft, 1 gate); the fence is now Wood privacy 6 ft, 80 ft, 1 gate');
    await shot(page, 'bids-builder-scope-stale');
    // Back to the fence it was written for: nothing to flag.
    await page.getByLabel('Run 1 length in feet').fill('64');
    await expect.poll(() => page.getByTestId('scope-stale').count()).toBe(0);
    await page.getByLabel('Run 1 length in feet').fill('80');
    await page.getByTestId('scope-stale').getByRole('button', { name: 'or clear it' }).click();
    expect(await box.inputValue()).toBe('');
    expect(await page.getByTestId('scope-stale').count()).toBe(0);
    await ctx.close();
  });

  it('works at phone width', async () => {
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const page = await signIn(ctx, base(), 'estimator@example.com', stack().demoPassword);
    await page.goto(`${base()}/jobs?status=measured`);
    await page.getByRole('list', { name: 'Jobs' }).locator('a').first().click();
    await page.waitForURL(/\/jobs\/\d+$/);
    await page.getByTestId('bids-panel').getByRole('link', { name: /Build a bid|New bid version/ }).click();
    await hydrated(page);
    await page.getByLabel('Run 1 length in feet').fill('52');
    await expect.poll(() => text(page, 'takeoff-posts')).toMatch(/^\d+ \(/);
    await shot(page, 'bids-builder-phone');
    await ctx.close();
  });
});

describe('the estimator keeps the price book, styles and rates', () => {
  it('shows the price changes, the styles with their recipes and the rate history', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'estimator@example.com', stack().demoPassword);
    await page.goto(`${base()}/pricebook`);
    await hydrated(page);
    await page.getByTestId('price-changes').waitFor();
    await page.getByPlaceholder('Item code, name or supplier').fill('4x4');
    await expect.poll(() => text(page, 'pricebook-total')).toMatch(/^3 items/);
    await shot(page, 'pricebook');
    await page.getByRole('row', { name: /PT-4X4-08/ }).getByRole('button', { name: 'Edit' }).click();
    await page.getByLabel('Unit cost in dollars').fill('12.49');
    await page.getByRole('button', { name: 'Save', exact: true }).click();
    await expect.poll(() => page.getByRole('status').first().textContent()).toContain('PT-4X4-08 saved at $12.49');

    await page.goto(`${base()}/styles`);
    await shot(page, 'styles');
    await page.getByRole('link', { name: 'Welded-wire panel in timber frame' }).click();
    await hydrated(page);
    await expect.poll(() => text(page, 'trial-summary')).toMatch(/posts/);
    await shot(page, 'style-editor');

    await page.goto(`${base()}/rates`);
    await hydrated(page);
    await page.getByText(/History \(\d+ versions\)/).first().click();
    await shot(page, 'labour-rates');
    const wood = page.getByRole('region', { name: 'Labour rates for Wood privacy 6 ft' });
    await wood.getByRole('button', { name: 'Change rates' }).click();
    await wood.getByLabel('New Dig a hole').fill('0.2');
    await wood.getByRole('button', { name: 'Save as new versions' }).click();
    await expect.poll(() => wood.getByRole('alert').first().textContent()).toMatch(/Say why/);
    await wood.getByPlaceholder(/Last five privacy jobs/).fill('Rocky ground on the ridge jobs');
    await wood.getByRole('button', { name: 'Save as new versions' }).click();
    await expect.poll(() => wood.getByRole('status').textContent()).toMatch(/1 new rate version saved/);
    await wood.getByText(/History \(\d+ versions\)/).click();
    expect(await wood.textContent()).toContain('Rocky ground on the ridge jobs');

    await page.goto(`${base()}/jobs?status=closed`);
    await hydrated(page);
    await page.locator('tbody a').first().click();
    await page.getByTestId('bids-panel').locator('tbody a').first().click();
    await page.getByTestId('bid-status').waitFor();
    expect(await text(page, 'bid-status')).toBe('Accepted');
    await shot(page, 'bid-version-accepted');
    await ctx.close();
  });

  it('a crew lead sees the checklist on an assigned job but no price book', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'crew@example.com', stack().demoPassword);
    const nav = page.getByTestId('main-nav').locator('.hidden.md\\:block');
    expect(await nav.getByRole('link', { name: 'Price book' }).count()).toBe(0);
    await page.goto(`${base()}/jobs?status=building`);
    await hydrated(page);
    await page.locator('tbody a').first().click();
    await page.getByTestId('checklist').waitFor();
    expect(await text(page, 'locate-status')).toMatch(/Ticket|ticket/);
    expect(await page.getByTestId('bids-panel').count()).toBe(0);
    expect(await page.content()).not.toMatch(/Unit cost/);
    await shot(page, 'crew-job-checklist');
    await ctx.close();
  });
});

describe('before the dig', () => {
  it('the owner cannot move a job to building without a locate ticket, sees why, and can override in writing', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    await page.goto(`${base()}/settings`);
    await page.getByRole('heading', { name: 'Digging, permits and the locate ticket' }).waitFor();
    await shot(page, 'settings-dig-rules');

    await page.goto(`${base()}/jobs/new`);
    await hydrated(page);
    await page.getByLabel('Title').fill(`Gate check ${Date.now().toString(36)}`);
    await page.getByLabel('Customer').selectOption({ index: 1 });
    await page.getByLabel('Status').selectOption({ label: 'Won' });
    await Promise.all([page.waitForURL(/\/jobs\/\d+$/), page.getByRole('button', { name: 'Create the job' }).click()]);
    const jobUrl = page.url();
    expect(await text(page, 'locate-status')).toBe('No locate ticket on file');

    await page.getByRole('link', { name: 'Edit job' }).click();
    await hydrated(page);
    await page.getByLabel('Status').selectOption({ label: 'Building' });
    await page.getByRole('button', { name: 'Save the job' }).click();
    await expect.poll(() => page.locator('#status-error').textContent()).toMatch(/locate ticket/);
    await shot(page, 'job-building-needs-locate');

    await page.goto(jobUrl);
    await hydrated(page);
    await page.getByText('Let this job build without a current locate ticket…').click();
    await page.getByLabel('Written reason (kept on the job\'s record)').fill('Posts go into the existing concrete sleeves; nobody digs on this job.');
    await page.getByRole('button', { name: 'Record the override' }).click();
    await expect.poll(() => text(page, 'override')).toMatch(/existing concrete sleeves/);
    await shot(page, 'job-checklist-override');

    await page.getByRole('link', { name: 'Edit job' }).click();
    await hydrated(page);
    await page.getByLabel('Status').selectOption({ label: 'Building' });
    await Promise.all([page.waitForURL(jobUrl), page.getByRole('button', { name: 'Save the job' }).click()]);
    expect(await page.locator('p', { hasText: 'Building' }).first().textContent()).toMatch(/Building/);
    await ctx.close();
  });
});
