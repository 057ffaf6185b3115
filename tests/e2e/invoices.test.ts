import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { closeBrowser, hydrated, launch, shot, signIn, watchConsole } from '../setup/browser';
import { stack } from '../setup/stack';
import { closeTestDb, testDb } from '../setup/db';
import { waitForMail } from '../setup/mail';

let browser: Browser;
const base = () => stack().appUrl;
const DEMO_ORG = 'org_demo_thornbury_000000000001';

beforeAll(async () => { browser = await launch(); });
afterAll(async () => { await closeBrowser(browser); await closeTestDb(); });

/** A won demo job that has no invoice yet, and its customer's address. */
async function unbilledJob() {
  const row = await testDb()('jobs as j').join('customers as c', 'c.id', 'j.customer_id')
    .where('j.organization_id', DEMO_ORG).where('j.status', 'won').where('j.contract_cents', '>', 0)
    .whereNotExists(function () { this.select('*').from('invoices as i').whereRaw('i.job_id = j.id'); })
    .orderBy('j.id').first('j.id', 'j.code', 'c.email');
  if (!row) throw new Error('the demo has no won job without an invoice');
  return { id: Number(row.id), code: row.code as string, email: row.email as string };
}

describe('getting paid, as the owner and as the customer', () => {
  it('issues and sends a deposit, the customer pays from the e-mail, and the owner sees it paid', async () => {
    const job = await unbilledJob();
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    const problems = watchConsole(page);

    await page.goto(`${base()}/jobs/${job.id}`);
    await page.getByTestId('billing-panel').waitFor();
    await shot(page, 'invoices-job-billing-panel');
    await page.getByTestId('billing-panel').getByRole('link', { name: 'New invoice' }).click();
    await page.waitForURL(/\/invoices\/new\?job=/);
    await hydrated(page);
    await page.getByLabel('Deposit (% of contract)').fill('10');
    await shot(page, 'invoices-new-deposit');
    await Promise.all([page.waitForURL(/\/invoices\/\d+$/), page.getByRole('button', { name: 'Save as draft' }).click()]);
    await hydrated(page);
    expect(await page.getByTestId('invoice-heading').textContent()).toContain('Draft invoice');
    await shot(page, 'invoices-draft');
    await page.getByRole('button', { name: 'Issue and send' }).click();
    await expect.poll(() => page.getByTestId('invoice-heading').textContent(), { timeout: 15_000 }).toMatch(/Invoice INV-\d{4}/);
    const heading = (await page.getByTestId('invoice-heading').textContent())!;
    const number = /INV-\d{4}/.exec(heading)![0];
    expect(await page.getByTestId('invoice-status').first().textContent()).toBe('Sent, unpaid');
    await shot(page, 'invoices-issued-sent');

    // The customer's side: the mail sink's web inbox, the e-mail, its link.
    const [mail] = (await waitForMail(job.email, 1)).filter((m) => m.subject.includes(number));
    expect(mail.attachments?.[0]?.contentType).toBe('application/pdf');
    const customer = await browser.newContext({ viewport: { width: 1100, height: 900 } });
    const inbox = await customer.newPage();
    await inbox.goto(stack().mailApi);
    await inbox.getByText(mail.subject).first().click();
    const link = inbox.locator('iframe').first().contentFrame().getByRole('link', { name: 'View and pay the invoice' });
    await link.waitFor({ timeout: 15_000 });
    await shot(inbox, 'invoices-mail-inbox');
    const href = (await link.getAttribute('href'))!;
    expect(href).toContain('/pay/');
    const pay = await customer.newPage();
    const payProblems = watchConsole(pay);
    await pay.goto(href);
    await hydrated(pay);
    expect(await pay.getByTestId('invoice-number').textContent()).toContain(number);
    // The customer reads what they owe, not the company's sending state.
    expect(await pay.getByTestId('invoice-status').textContent()).toBe('Due');
    await shot(pay, 'invoices-customer-page');
    await pay.getByRole('button', { name: /^Pay online/ }).click();
    await pay.waitForURL(new RegExp(`^${stack().stripeApi}/checkout/`));
    await shot(pay, 'invoices-hosted-pay-page');
    await pay.getByRole('button', { name: /^Pay \$/ }).click();
    await pay.waitForURL(/\/pay\/.*\?paid=/);
    await pay.getByTestId('paid-banner').waitFor();
    expect(await pay.getByTestId('invoice-status').textContent()).toBe('Paid');
    expect(await pay.getByTestId('balance').textContent()).toBe('$0.00');
    await shot(pay, 'invoices-customer-paid');
    await waitForMail(job.email, 2);

    // Back to the owner: paid, counted once, and gone from receivables.
    await page.reload();
    await hydrated(page);
    expect(await page.getByTestId('invoice-status').first().textContent()).toBe('Paid');
    expect(await page.getByTestId('invoice-balance').textContent()).toBe('$0.00');
    const payments = await testDb()('payments as p').join('invoices as i', 'i.id', 'p.invoice_id').where('i.number_text', number).where('i.organization_id', DEMO_ORG).select('p.method', 'p.applied_cents', 'i.total_cents');
    expect(payments).toHaveLength(1);
    expect(payments[0].method).toBe('card');
    expect(Number(payments[0].applied_cents)).toBe(Number(payments[0].total_cents));
    await shot(page, 'invoices-owner-paid');
    const invoicePage = page.url();
    await page.goto(`${base()}/receivables`);
    await hydrated(page);
    await page.getByTestId('receivables').waitFor();
    expect(await page.getByRole('link', { name: number }).count()).toBe(0);
    await shot(page, 'invoices-receivables');

    // The owner refunds part of the card payment from the invoice: asked of the card
    // processor with the form's request key, recorded once (its webhook finds it recorded).
    await page.goto(invoicePage);
    await hydrated(page);
    await page.getByRole('button', { name: 'Refund' }).click();
    await page.getByLabel('Amount ($)').fill('10.00');
    await page.getByLabel('Reason').fill('Gate latch not fitted');
    await Promise.all([page.waitForEvent('load'), page.getByRole('button', { name: 'Refund' }).click()]);
    await hydrated(page);
    expect(await page.getByTestId('invoice-balance').textContent()).toBe('$10.00');
    expect(await page.getByTestId('invoice-history').textContent()).toContain('Refund recorded');
    const refunds = await testDb()('refunds as r').join('invoices as i', 'i.id', 'r.invoice_id').where('i.number_text', number).where('i.organization_id', DEMO_ORG).select('r.amount_cents', 'r.stripe_refund');
    expect(refunds.map((r) => Number(r.amount_cents))).toEqual([1_000]);
    expect(refunds[0].stripe_refund).toMatch(/^re_test_/);
    expect(await testDb()('stripe_refunds').where({ organization_id: DEMO_ORG, stripe_refund: refunds[0].stripe_refund }).first()).toMatchObject({ status: 'succeeded', request_key: expect.stringMatching(/^[0-9a-f]{32}$/) });
    await shot(page, 'invoices-owner-refunded');
    expect([...problems, ...payProblems].filter((p) => /Content Security Policy|Refused/.test(p))).toEqual([]);
    await customer.close();
    await ctx.close();
  });

  it('the owner records a change order and the customer\'s approval on the job page', async () => {
    const job = await testDb()('jobs').where({ organization_id: DEMO_ORG, status: 'building' }).orderBy('id', 'desc').first('id');
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    await page.goto(`${base()}/jobs/${job.id}`);
    await hydrated(page);
    const before = await page.getByTestId('contract-to-date').textContent();
    const panel = page.getByTestId('change-orders');
    await panel.getByRole('button', { name: 'New change order' }).click();
    await panel.getByRole('button', { name: 'Save the change order' }).click();
    expect(await panel.locator('#description-error').textContent()).toContain('Describe the change');
    await panel.getByLabel('What changes').fill('Add a 4 ft walk gate by the shed');
    await panel.getByLabel('Price to the customer ($)').fill('650');
    await panel.getByLabel('Est. materials ($)').fill('240');
    await panel.getByLabel('Est. labour ($)').fill('180');
    await panel.getByRole('button', { name: 'Save the change order' }).click();
    await page.waitForLoadState('load');
    await page.getByText('Add a 4 ft walk gate by the shed').waitFor();
    await hydrated(page);
    const item = page.getByTestId('change-orders').locator('li', { hasText: 'Add a 4 ft walk gate by the shed' });
    await item.getByRole('button', { name: "Record the customer's answer" }).click();
    await item.getByLabel('Approved by').fill('Homeowner, on site');
    await item.getByRole('button', { name: 'Record approval' }).click();
    await page.waitForLoadState('load');
    await expect.poll(() => page.getByTestId('contract-to-date').textContent()).not.toBe(before);
    const toCents = (t: string | null) => Math.round(Number((t ?? '').replace(/[$,]/g, '')) * 100);
    expect(toCents(await page.getByTestId('contract-to-date').textContent()) - toCents(before)).toBe(65_000);
    await shot(page, 'invoices-change-order-approved');
    await ctx.close();
  });

  it('a customer on a phone reads the invoice and can cancel on the pay page', async () => {
    const inv = await testDb()('invoices').where({ organization_id: DEMO_ORG }).whereIn('status', ['issued', 'partly_paid']).orderBy('id').first('id');
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const owner = await signIn(ctx, base(), 'owner@example.com', stack().demoPassword);
    await owner.goto(`${base()}/invoices/${inv.id}`);
    const href = (await owner.getByTestId('public-link').getAttribute('href'))!;
    await shot(owner, 'invoices-phone-owner-invoice');
    const phone = await (await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true })).newPage();
    await phone.goto(href);
    await hydrated(phone);
    await shot(phone, 'invoices-phone-customer');
    await phone.getByRole('button', { name: /^Pay online/ }).click();
    await phone.waitForURL(new RegExp(`^${stack().stripeApi}/checkout/`));
    await phone.getByRole('button', { name: 'Cancel and go back' }).click();
    await phone.waitForURL(/cancelled=1/);
    expect(await phone.getByRole('status').textContent()).toContain('cancelled');
    await ctx.close();
  });

  it('the bookkeeper filters receivables by aging bucket and exports them', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, base(), 'bookkeeper@example.com', stack().demoPassword);
    await shot(page, 'invoices-dashboard-receivables-tiles');
    await page.goto(`${base()}/receivables`);
    await hydrated(page);
    for (const b of ['current', 'd1_30', 'd31_60', 'd61_90', 'over_90']) {
      expect(await page.getByTestId(`bucket-${b}`).textContent(), b).not.toBe('$0.00');
    }
    const over90 = await page.getByTestId('bucket-over_90').textContent();
    await page.getByTestId('bucket-over_90').click();
    await expect.poll(() => page.getByTestId('receivables-total').textContent()).toBe(over90);
    const csv = await page.getByRole('link', { name: 'Export CSV' }).getAttribute('href');
    expect(csv).toContain('bucket=over_90');
    expect(csv).toContain('format=csv');
    const res = await page.request.get(`${base()}${csv}`);
    expect(res.headers()['content-type']).toContain('text/csv');
    expect((await res.text()).split('\r\n')[0]).toContain('Days past due');
    await shot(page, 'invoices-receivables-over-90');
    await page.goto(`${base()}/invoices`);
    await hydrated(page);
    await shot(page, 'invoices-list');
    await ctx.close();
  });
});
