import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import currencyCodes from 'currency-codes';
import Stripe from 'stripe';
import { Client } from '../setup/client';
import { makeCompany, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { waitForMail } from '../setup/mail';
import { stack } from '../setup/stack';
import { billableJob, draft, fakeEvents, getInvoice, hostedPage, issue, payLink, postWebhook, send, waitFor } from '../setup/invoices';

let co: TestCompany;
beforeAll(async () => {
  co = await makeCompany();
  await co.owner.patch('/api/settings', { taxMode: 'materials', taxRatePct: 7.375 });
});
afterAll(closeTestDb);

/** Issue → send → the customer follows the mailed link → Checkout → pays on the hosted page. */
async function paidByCard(contract = 1_200_000) {
  const { job, email } = await billableJob(co, contract);
  const inv = await draft(co.owner, { jobId: job.id, kind: 'deposit', basisPct: 25 });
  await issue(co.owner, inv.id);
  await send(co.owner, inv.id);
  const [mail] = await waitForMail(email, 1);
  const link = payLink(mail.text);
  const token = link.split('/pay/')[1];
  const customer = new Client();
  const page = await customer.get(`/pay/${token}`, { accept: 'text/html' });
  expect(page.status).toBe(200);
  expect(page.text).toContain('Pay online');
  const checkout = await customer.post(`/api/public/invoices/${token}/checkout`);
  expect(checkout.status).toBe(200);
  return { job, email, inv: await getInvoice(co.owner, inv.id), mail, token, customer, sessionUrl: checkout.body.url as string };
}

describe('paying online', () => {
  it('issue → send (PDF attached) → pay on the hosted page → webhook → paid, with a receipt', async () => {
    const { inv, mail, email, token, customer, sessionUrl } = await paidByCard();
    expect(mail.subject).toContain(inv.numberText);
    expect(mail.attachments?.map((a) => a.contentType)).toEqual(['application/pdf']);
    const pdf = await fetch(`${stack().mailApi}/api/email/${mail.id}/attachment/${mail.attachments![0].generatedFileName}`);
    const bytes = Buffer.from(await pdf.arrayBuffer());
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    const outbox = await testDb()('outbox').where({ organization_id: co.id, to_address: email }).select('status', 'message_id');
    expect(outbox).toHaveLength(1);
    expect(outbox[0].status).toBe('sent');
    expect(outbox[0].message_id).toMatch(/^<outbox-\d+@tallypost\.local>$/);

    const back = await hostedPage(sessionUrl, 'pay');
    expect(back.status).toBe(303);
    expect(back.location).toContain(`/pay/${token}?paid=cs_test_`);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.status).toBe('paid');
    expect(after.paidCents).toBe(inv.totalCents);
    expect(after.payments).toHaveLength(1);
    expect(after.payments[0].method).toBe('card');
    const receipt = await waitForMail(email, 2);
    expect(receipt.some((m) => /Payment received/.test(m.subject))).toBe(true);
    const paidPage = await customer.get(back.location!.replace(/^https?:\/\/[^/]+/, ''), { accept: 'text/html' });
    expect(paidPage.text).toContain('Paid in full');
  });

  it('sends Stripe the balance in the currency\'s smallest unit (ISO 4217 minor units from currency-codes)', async () => {
    const { inv, sessionUrl } = await paidByCard(987_654);
    const events = await fakeEvents();
    void events;
    const html = await (await fetch(sessionUrl)).text();
    // Independent check: the exponent comes from the currency-codes package, not from our table.
    const digits = currencyCodes.code('USD')!.digits;
    expect(digits).toBe(2);
    const expected = inv.balanceCents * 10 ** (digits - 2);
    const sessionId = sessionUrl.split('/').pop()!;
    const session = await fetch(`${stack().stripeApi}/v1/checkout/sessions/${sessionId}`, { headers: { authorization: 'Bearer sk_test_check' } }).then((r) => r.json());
    expect(session.amount_total).toBe(expected);
    expect(session.currency).toBe('usd');
    expect(session.metadata).toEqual({ invoice_id: String(inv.id), organization_id: co.id });
    expect(html).toContain(new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' }).format(expected / 10 ** digits));
  });

  it('changes nothing when the same events arrive five more times, in any order', async () => {
    const { inv, sessionUrl } = await paidByCard();
    await hostedPage(sessionUrl, 'pay');
    const paid = await getInvoice(co.owner, inv.id);
    expect(paid.status).toBe('paid');
    const mine = (await fakeEvents()).filter((e) => e.payload.includes(`"invoice_id": "${inv.id}"`));
    expect(mine.map((e) => e.type).sort()).toEqual(['checkout.session.completed', 'payment_intent.succeeded']);
    const replays = [];
    for (let i = 0; i < 5; i++) replays.push(...(i % 2 ? [...mine].reverse() : mine));
    const results = await Promise.all(replays.map((e) => postWebhook(new Client(), e.payload)));
    expect(results.every((r) => r.status === 200)).toBe(true);
    const again = await getInvoice(co.owner, inv.id);
    expect(again.payments).toHaveLength(1);
    expect(again.paidCents).toBe(paid.paidCents);
    const stored = await testDb()('stripe_events').whereIn('id', mine.map((e) => e.id));
    expect(stored).toHaveLength(2);
  });

  it('records a payment once when the payment intent event comes before the session event', async () => {
    const { job } = await billableJob(co, 500_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 50_000 })).id);
    const meta = { invoice_id: String(inv.id), organization_id: co.id };
    const intent = `pi_test_ooo${inv.id}`;
    const created = Math.floor(Date.now() / 1000);
    const pi = JSON.stringify({ id: `evt_test_pi_${inv.id}`, object: 'event', type: 'payment_intent.succeeded', created, data: { object: { id: intent, object: 'payment_intent', amount: inv.totalCents, amount_received: inv.totalCents, currency: 'usd', status: 'succeeded', metadata: meta } } });
    const cs = JSON.stringify({ id: `evt_test_cs_${inv.id}`, object: 'event', type: 'checkout.session.completed', created, data: { object: { id: `cs_test_ooo${inv.id}`, object: 'checkout.session', amount_total: inv.totalCents, currency: 'usd', payment_status: 'paid', payment_intent: intent, metadata: meta } } });
    const c = new Client();
    expect((await postWebhook(c, pi)).status).toBe(200);
    expect((await postWebhook(c, cs)).status).toBe(200);
    expect((await postWebhook(c, pi)).status).toBe(200);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.payments).toHaveLength(1);
    expect(after.status).toBe('paid');
  });

  it('records a payment once when its two events arrive at the same moment, several times over', async () => {
    const { job } = await billableJob(co, 400_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 40_000 })).id);
    const meta = { invoice_id: String(inv.id), organization_id: co.id };
    const intent = `pi_test_race${inv.id}`;
    const created = Math.floor(Date.now() / 1000);
    const events = Array.from({ length: 3 }, (_, k) => [
      JSON.stringify({ id: `evt_test_race_pi_${inv.id}_${k}`, object: 'event', type: 'payment_intent.succeeded', created, data: { object: { id: intent, object: 'payment_intent', amount: inv.totalCents, amount_received: inv.totalCents, currency: 'usd', status: 'succeeded', metadata: meta } } }),
      JSON.stringify({ id: `evt_test_race_cs_${inv.id}_${k}`, object: 'event', type: 'checkout.session.completed', created, data: { object: { id: `cs_test_race${inv.id}`, object: 'checkout.session', amount_total: inv.totalCents, currency: 'usd', payment_status: 'paid', payment_intent: intent, metadata: meta } } }),
    ]).flat();
    const results = await Promise.all(events.map((e) => postWebhook(new Client(), e)));
    expect(results.map((r) => r.status)).toEqual(events.map(() => 200));
    const after = await getInvoice(co.owner, inv.id);
    expect(after.payments).toHaveLength(1);
    expect(after.paidCents).toBe(inv.totalCents);
    expect(after.payments[0].creditCents).toBe(0);
  });

  it('notes a declined card and leaves the invoice unpaid', async () => {
    const { inv, sessionUrl } = await paidByCard();
    const r = await hostedPage(sessionUrl, 'decline');
    expect(r.status).toBe(200);
    expect(r.html).toContain('declined');
    const after = await waitFor(() => getInvoice(co.owner, inv.id), (i) => i.history.some((h: { action: string }) => h.action === 'card_declined'));
    expect(after.status).toBe('issued');
    expect(after.payments).toHaveLength(0);
  });

  it('refunds part of a card payment through Stripe, once, and the balance comes back', async () => {
    const { inv, sessionUrl } = await paidByCard();
    await hostedPage(sessionUrl, 'pay');
    const paid = await getInvoice(co.owner, inv.id);
    const pay = paid.payments[0];
    expect((await co.bookkeeper.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 10_000 })).status).toBe(403);
    const r = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 10_000, reason: 'Gate hardware not fitted' });
    expect(r.status).toBe(200);
    expect(r.body.status).toBe('partly_paid');
    expect(r.body.balanceCents).toBe(10_000);
    // The stand-in's charge.refunded event arrives too; it finds the refund already recorded.
    await waitFor(fakeEvents, (evs) => evs.some((e) => e.type === 'charge.refunded' && e.payload.includes(pay.stripePaymentIntent) && e.deliveries.some((d) => d.status === 200)));
    const after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.refunds[0].stripeRefund).toMatch(/^re_test_/);
    expect(after.paidCents).toBe(paid.paidCents - 10_000);
    const tooMuch = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: paid.paidCents });
    expect(tooMuch.status).toBe(422);
  });
});

describe('checkout sessions', () => {
  const session = (url: string) => fetch(`${stack().stripeApi}/v1/checkout/sessions/${url.split('/').pop()}`, { headers: { authorization: 'Bearer sk_test_check' } }).then((r) => r.json());
  const tokenOf = (publicUrl: string) => publicUrl.split('/pay/')[1];

  it('gives the same session for the same request, and a new one after the link is revoked', async () => {
    const { job } = await billableJob(co, 600_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 60_000 })).id);
    const first = tokenOf(inv.publicUrl);
    const customer = new Client();
    const a = await customer.post(`/api/public/invoices/${first}/checkout`);
    const b = await customer.post(`/api/public/invoices/${first}/checkout`);
    expect(a.status, a.text).toBe(200);
    expect(b.body.url).toBe(a.body.url);
    const revoked = await co.owner.delete(`/api/invoices/${inv.id}/link`);
    expect(revoked.status, revoked.text).toBe(200);
    const second = tokenOf(revoked.body.publicUrl);
    expect(second).not.toBe(first);
    expect((await customer.post(`/api/public/invoices/${first}/checkout`)).status).toBe(404);
    const c = await customer.post(`/api/public/invoices/${second}/checkout`);
    expect(c.status, c.text).toBe(200);
    expect(c.body.url).not.toBe(a.body.url);
    // The new session sends the customer back to the link that works.
    expect((await session(c.body.url)).success_url).toContain(`/pay/${second}?paid=`);
    const back = await hostedPage(c.body.url, 'pay');
    expect(back.location).toContain(`/pay/${second}?paid=cs_test_`);
    expect((await customer.get(back.location!.replace(/^https?:\/\/[^/]+/, ''), { accept: 'text/html' })).status).toBe(200);
  });

  it('is refused by the stand-in, as by Stripe, when a key comes again with other parameters', async () => {
    const api = new URL(stack().stripeApi);
    const sdk = new Stripe('sk_test_idem', { host: api.hostname, port: Number(api.port), protocol: 'http', maxNetworkRetries: 0 });
    const params = (amount: number): Stripe.Checkout.SessionCreateParams => ({
      mode: 'payment', success_url: 'http://x.test/ok', cancel_url: 'http://x.test/no',
      line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: amount, product_data: { name: 'Deposit' } } }],
    });
    const key = `test-idem-${Date.now()}`;
    const one = await sdk.checkout.sessions.create(params(10_000), { idempotencyKey: key });
    const again = await sdk.checkout.sessions.create(params(10_000), { idempotencyKey: key });
    expect(again.id).toBe(one.id);
    const err = await sdk.checkout.sessions.create(params(9_000), { idempotencyKey: key }).then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(err).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);
    expect(err!.statusCode).toBe(400);
    expect(err!.type).toBe('StripeIdempotencyError');
    expect(err!.raw).toMatchObject({ type: 'idempotency_error' });
  });

  it('expires the open hosted page when a check pays part, the balance moves, or the invoice is voided', async () => {
    const { job } = await billableJob(co, 800_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 80_000 })).id);
    const token = tokenOf(inv.publicUrl);
    const customer = new Client();
    const first = (await customer.post(`/api/public/invoices/${token}/checkout`)).body.url as string;
    expect((await session(first)).status).toBe('open');
    const paid = await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: 30_000, method: 'check', receivedOn: inv.today, reference: 'Check 311' });
    expect(paid.status, paid.text).toBe(201);
    expect((await session(first)).status).toBe('expired');
    expect((await fetch(first)).status).toBe(410);
    const second = (await customer.post(`/api/public/invoices/${token}/checkout`)).body.url as string;
    expect(second).not.toBe(first);
    const open = await session(second);
    expect(open).toMatchObject({ status: 'open', amount_total: inv.totalCents - 30_000 });
    // Paid in full by check: the second page closes too, and nothing more can be paid online.
    const rest = await co.bookkeeper.post(`/api/invoices/${inv.id}/payments`, { amountCents: inv.totalCents - 30_000, method: 'check', receivedOn: inv.today });
    expect(rest.body.invoice.status).toBe('paid');
    expect((await session(second)).status).toBe('expired');
    expect((await customer.post(`/api/public/invoices/${token}/checkout`)).status).toBe(422);
    const rows = await testDb()('checkout_sessions').where({ organization_id: co.id, invoice_id: inv.id }).orderBy('id');
    expect(rows.map((r) => [r.status, Number(r.amount_cents)])).toEqual([['expired', inv.totalCents], ['expired', inv.totalCents - 30_000]]);

    const { job: job2 } = await billableJob(co, 800_000);
    const inv2 = await issue(co.owner, (await draft(co.owner, { jobId: job2.id, kind: 'deposit', requestedCents: 50_000 })).id);
    const url2 = (await customer.post(`/api/public/invoices/${tokenOf(inv2.publicUrl)}/checkout`)).body.url as string;
    expect((await co.owner.post(`/api/invoices/${inv2.id}/void`, { reason: 'Wrong job', replace: false })).status).toBe(200);
    expect((await session(url2)).status).toBe('expired');
  });

  it('leaves the paid session complete and closes no page that still matches the balance', async () => {
    const { inv, sessionUrl } = await paidByCard(700_000);
    const other = await paidByCard(710_000);
    await hostedPage(sessionUrl, 'pay');
    expect((await session(sessionUrl)).status).toBe('complete');
    expect((await testDb()('checkout_sessions').where({ organization_id: co.id, invoice_id: inv.id }).first()).status).toBe('complete');
    expect((await session(other.sessionUrl)).status).toBe('open');
  });
});

describe('webhook signatures', () => {
  const body = JSON.stringify({ id: 'evt_test_sig', object: 'event', type: 'payment_intent.succeeded', created: 1, data: { object: { id: 'pi_x', metadata: {} } } });
  it('refuses a wrong signature', async () => {
    const r = await postWebhook(new Client(), body, { secret: 'whsec_not_the_secret' });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('BAD_SIGNATURE');
  });
  it('refuses a body changed after signing', async () => {
    const c = new Client();
    const header = (await import('stripe')).default.webhooks.generateTestHeaderString({ payload: body, secret: stack().stripeWebhookSecret });
    const r = await c.request('POST', '/api/stripe/webhook', { body: body.replace('evt_test_sig', 'evt_test_sig2'), headers: { 'content-type': 'application/json', 'stripe-signature': header }, origin: null });
    expect(r.status).toBe(400);
  });
  it('refuses a stale timestamp and one from the future', async () => {
    const now = Math.floor(Date.now() / 1000);
    expect((await postWebhook(new Client(), body, { timestamp: now - 400 })).status).toBe(400);
    expect((await postWebhook(new Client(), body, { timestamp: now + 400 })).status).toBe(400);
    expect((await postWebhook(new Client(), body, { timestamp: now - 60 })).status).toBe(200);
  });
  it('refuses a missing signature header', async () => {
    const r = await new Client().request('POST', '/api/stripe/webhook', { body, headers: { 'content-type': 'application/json' }, origin: null });
    expect(r.status).toBe(400);
  });
});
