import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import currencyCodes from 'currency-codes';
import Stripe from 'stripe';
import { Client } from '../setup/client';
import { makeCompany, type TestCompany } from '../setup/factory';
import { closeTestDb, testDb } from '../setup/db';
import { waitForMail } from '../setup/mail';
import { stack } from '../setup/stack';
import { billableJob, cardLife, draft, fakeEvents, getInvoice, hostedPage, issue, payLink, postWebhook, send, stripeOutside, waitFor, webhookEndpoint, type FakeEvent } from '../setup/invoices';

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
    const life = await offline(() => cardLife(co.id, inv, { decline: false }));
    const pi = byType(life.events, 'payment_intent.succeeded');
    const cs = byType(life.events, 'checkout.session.completed');
    const c = new Client();
    expect((await postWebhook(c, pi.payload)).status).toBe(200);
    expect((await postWebhook(c, cs.payload)).status).toBe(200);
    expect((await postWebhook(c, pi.payload)).status).toBe(200);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.payments).toHaveLength(1);
    expect(after.status).toBe('paid');
  });

  it('records a payment once when its two events arrive at the same moment, several times over', async () => {
    const { job } = await billableJob(co, 400_000);
    const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: 40_000 })).id);
    const life = await offline(() => cardLife(co.id, inv, { decline: false }));
    const pair = [byType(life.events, 'payment_intent.succeeded').payload, byType(life.events, 'checkout.session.completed').payload];
    const events = [...pair, ...pair, ...pair];
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
    expect(r.status, r.text).toBe(200);
    expect(r.body.status).toBe('partly_paid');
    expect(r.body.balanceCents).toBe(10_000);
    // Stripe's refund.created and charge.refunded arrive too; they find the refund already recorded.
    const events = await waitFor(() => fakeEvents(pay.stripePaymentIntent), (evs) => ['refund.created', 'charge.refunded'].every((t) => evs.some((e) => e.type === t && e.deliveries.some((d) => d.status === 200))));
    expect(events.filter((e) => e.type === 'charge.refunded').every((e) => !('refunds' in JSON.parse(e.payload).data.object))).toBe(true);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.refunds[0]).toMatchObject({ amountCents: 10_000, reason: 'Gate hardware not fitted' });
    expect(after.refunds[0].stripeRefund).toMatch(/^re_test_/);
    expect(after.paidCents).toBe(paid.paidCents - 10_000);
    const row = await testDb()('stripe_refunds').where({ organization_id: co.id, payment_id: pay.id }).first();
    expect(row).toMatchObject({ status: 'succeeded', stripe_refund: after.refunds[0].stripeRefund, requested_by: expect.any(String) });
    const tooMuch = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: paid.paidCents });
    expect(tooMuch.status).toBe(422);
  });
});

/** Runs `fn` with the app's webhook endpoint at the stand-in off, so its events wait for the test to deliver them. */
async function offline<T>(fn: () => Promise<T>): Promise<T> {
  await webhookEndpoint(true);
  try {
    return await fn();
  } finally {
    await webhookEndpoint(false);
  }
}
const byType = (events: FakeEvent[], type: string) => {
  const e = events.find((x) => x.type === type);
  if (!e) throw new Error(`no ${type} among ${events.map((x) => x.type).join(', ')}`);
  return e;
};
/**
 * Makes the record step fail: a trigger refuses refunds rows for this payment (a fault the
 * app cannot tell from a database that fails mid-request). Returns the undo.
 */
async function refuseRefundRows(paymentId: number): Promise<() => Promise<void>> {
  const name = `refuse_refunds_${Number(paymentId)}`;
  await testDb().raw(`CREATE TRIGGER ${name} BEFORE INSERT ON refunds FOR EACH ROW BEGIN IF NEW.payment_id = ${Number(paymentId)} THEN SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'refused by test'; END IF; END`);
  return async () => { await testDb().raw(`DROP TRIGGER IF EXISTS ${name}`); };
}
const refundRows = (invoiceId: number) => testDb()('refunds').where({ organization_id: co.id, invoice_id: invoiceId }).orderBy('id');

/** An issued invoice paid by card at the stand-in, its payment recorded from the events. */
async function paidInvoice(cents: number, card?: string) {
  const { job } = await billableJob(co, cents * 10);
  const inv = await issue(co.owner, (await draft(co.owner, { jobId: job.id, kind: 'deposit', requestedCents: cents })).id);
  const life = await offline(() => cardLife(co.id, inv, { decline: false, card }));
  for (const e of life.events) expect((await postWebhook(new Client(), e.payload)).status).toBe(200);
  const paid = await getInvoice(co.owner, inv.id);
  expect(paid.status).toBe('paid');
  return { inv: paid, intent: life.intent, pay: paid.payments[0] };
}

describe('refunds', () => {
  it('records a refund made outside Tallypost from its refund.created event alone, once', async () => {
    const { inv, intent } = await paidInvoice(80_000);
    const T = inv.totalCents;
    const made = await offline(() => stripeOutside().refunds.create({ payment_intent: intent, amount: 12_500 }));
    const events = await fakeEvents(made.id);
    const created = byType(events, 'refund.created');
    // Only refund.created: charge.refunded is held back.
    expect((await postWebhook(new Client(), created.payload)).status).toBe(200);
    let after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.refunds[0]).toMatchObject({ amountCents: 12_500, stripeRefund: made.id, reason: 'Refunded at the card processor' });
    expect(after).toMatchObject({ status: 'partly_paid', paidCents: T - 12_500, balanceCents: 12_500 });
    // Replayed, reordered, and with charge.refunded (which lists the charge's refunds through the SDK): nothing more.
    const all = await fakeEvents(intent);
    const refundEvents = all.filter((e) => e.type === 'charge.refunded' || e.type.startsWith('refund.'));
    expect(refundEvents.map((e) => e.type).sort()).toEqual(['charge.refunded', 'refund.created']);
    const replays = [...refundEvents, ...refundEvents.reverse(), created, created];
    const results = await Promise.all(replays.map((e) => postWebhook(new Client(), e.payload)));
    expect(results.map((r) => r.status)).toEqual(replays.map(() => 200));
    after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.paidCents).toBe(T - 12_500);
    expect(await testDb()('stripe_refunds').where({ organization_id: co.id, stripe_refund: made.id })).toMatchObject([{ status: 'succeeded', requested_by: null }]);
  });

  it('records refunds from charge.refunded alone by listing the charge\'s refunds through the SDK', async () => {
    const { inv, intent } = await paidInvoice(90_000);
    const T = inv.totalCents;
    const sdk = stripeOutside();
    const [a, b] = await offline(async () => [await sdk.refunds.create({ payment_intent: intent, amount: 1_000 }), await sdk.refunds.create({ payment_intent: intent, amount: 2_000 })]);
    const charged = (await fakeEvents(intent)).filter((e) => e.type === 'charge.refunded');
    expect(charged).toHaveLength(2);
    // The later charge.refunded alone: both refunds are found by listing.
    expect((await postWebhook(new Client(), charged[1].payload)).status).toBe(200);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.refunds.map((r: { stripeRefund: string }) => r.stripeRefund).sort()).toEqual([a.id, b.id].sort());
    expect(after.paidCents).toBe(T - 3_000);
    for (const e of await fakeEvents(intent)) expect((await postWebhook(new Client(), e.payload)).status).toBe(200);
    expect((await getInvoice(co.owner, inv.id)).refunds).toHaveLength(2);
  });

  it('puts back a refund that fails at the processor (Stripe\'s test card 4000 0000 0000 5126), once', async () => {
    const { inv, intent, pay } = await paidInvoice(50_000, '4000000000005126');
    const T = inv.totalCents;
    const r = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 20_000, reason: 'Posts set short', requestKey: `fail-${inv.id}-aaaaaaaaaaaa` });
    expect(r.status, r.text).toBe(200);
    expect(r.body).toMatchObject({ status: 'partly_paid', paidCents: T - 20_000 });
    // A moment later Stripe reports it failed: refund.updated, refund.failed.
    const back = await waitFor(() => getInvoice(co.owner, inv.id), (i) => i.status === 'paid');
    expect(back.paidCents).toBe(T);
    expect(back.payments[0].refundedCents).toBe(0);
    const rows = await refundRows(inv.id);
    expect(rows).toHaveLength(1);
    expect(Number(rows[0].amount_cents)).toBe(0);
    expect(rows[0].reason).toContain('failed at the card processor (expired_or_canceled_card)');
    expect(back.history.some((h: { action: string }) => h.action === 'refund_failed')).toBe(true);
    // Every event of it again, newest first: still put back, nothing counted twice.
    const events = (await fakeEvents(intent)).filter((e) => e.type.startsWith('refund.') || e.type === 'charge.refunded');
    expect(events.map((e) => e.type).sort()).toEqual(['charge.refunded', 'refund.created', 'refund.failed', 'refund.updated']);
    for (const e of [...events].reverse()) expect((await postWebhook(new Client(), e.payload)).status).toBe(200);
    const still = await getInvoice(co.owner, inv.id);
    expect(still).toMatchObject({ status: 'paid', paidCents: T });
    expect(await testDb()('stripe_refunds').where({ organization_id: co.id, payment_id: pay.id })).toMatchObject([{ status: 'failed', failure: 'expired_or_canceled_card' }]);
  });

  it('never counts a failed refund whose failure arrives before its creation', async () => {
    const { inv, intent } = await paidInvoice(45_000, '4000000000005126');
    const T = inv.totalCents;
    const made = await offline(async () => {
      const r = await stripeOutside().refunds.create({ payment_intent: intent, amount: T });
      await waitFor(() => fakeEvents(r.id), (evs) => evs.some((e) => e.type === 'refund.failed'));
      return r;
    });
    const events = await fakeEvents(made.id);
    const order = ['refund.failed', 'refund.updated', 'refund.created'].map((t) => byType(events, t));
    for (const e of [...order, ...(await fakeEvents(intent)).filter((e) => e.type === 'charge.refunded')]) expect((await postWebhook(new Client(), e.payload)).status).toBe(200);
    const after = await getInvoice(co.owner, inv.id);
    expect(after).toMatchObject({ status: 'paid', paidCents: T });
    expect(after.refunds).toHaveLength(0);
    expect(await testDb()('stripe_refunds').where({ stripe_refund: made.id }).first()).toMatchObject({ status: 'failed' });
  });

  it('counts a pending refund (test card 4000 0000 0000 7726) once, through to succeeded', async () => {
    const { inv, pay } = await paidInvoice(30_000, '4000000000007726');
    const r = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: inv.totalCents });
    expect(r.status, r.text).toBe(200);
    expect(r.body.status).toBe('issued');
    const row = await waitFor(() => testDb()('stripe_refunds').where({ organization_id: co.id, payment_id: pay.id }).first(), (x) => x?.status === 'succeeded');
    expect(row.stripe_refund).toMatch(/^re_test_/);
    const after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.paidCents).toBe(0);
  });

  it('checks the invoice, the payment and the amount before asking Stripe for anything', async () => {
    const { inv, intent, pay } = await paidInvoice(25_000);
    const other = await paidInvoice(26_000);
    const asked = async () => (await stripeOutside().refunds.list({ payment_intent: intent })).data.length;
    const tries = [
      { url: `/api/invoices/${other.inv.id}/payments/${pay.id}/refund`, body: { amountCents: 1_000 }, status: 404 },
      { url: `/api/invoices/999999999/payments/${pay.id}/refund`, body: { amountCents: 1_000 }, status: 404 },
      { url: `/api/invoices/${inv.id}/payments/${pay.id}/refund`, body: { amountCents: inv.totalCents + 1 }, status: 422 },
      { url: `/api/invoices/${inv.id}/payments/${pay.id}/refund`, body: { amountCents: inv.totalCents + 1, requestKey: 'k-too-much-00000000' }, status: 422 },
    ];
    for (const t of tries) expect((await co.owner.post(t.url, t.body)).status, t.url).toBe(t.status);
    for (const role of [co.crew_lead, co.bookkeeper, co.estimator]) expect((await role.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 1_000 })).status).toBe(403);
    expect(await asked()).toBe(0);
    expect(await testDb()('stripe_refunds').where({ organization_id: co.id, payment_id: pay.id })).toEqual([]);
  });

  it('when saving fails after Stripe made the refund, the webhook records it once and asking again does not refund twice', async () => {
    const { inv, intent, pay } = await paidInvoice(70_000);
    const T = inv.totalCents;
    // The record step fails (refuseRefundRows). The endpoint is off meanwhile, so the test
    // delivers the events itself, when it chooses.
    const key = `retry-${inv.id}-bbbbbbbbbbbbbb`;
    const ask = () => co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 7_000, reason: 'Dead gate latch', requestKey: key });
    const undo = await refuseRefundRows(pay.id);
    try {
      await offline(async () => {
        const first = await ask();
        expect(first.status, first.text).toBe(503);
        expect(first.body.error.code).toBe('REFUND_UNRECORDED');
        // Asked again while the record still fails: the same key, so Stripe answers with the same refund.
        expect((await ask()).status).toBe(503);
      });
      expect(await testDb()('stripe_refunds').where({ organization_id: co.id, payment_id: pay.id })).toMatchObject([{ status: 'requested', stripe_refund: null, request_key: key }]);
    } finally {
      await undo();
    }
    const atStripe = await stripeOutside().refunds.list({ payment_intent: intent });
    expect(atStripe.data).toHaveLength(1);
    expect((await getInvoice(co.owner, inv.id)).refunds).toHaveLength(0);
    // The webhook: refund.created alone records it against the request (who asked, why).
    const created = byType(await fakeEvents(atStripe.data[0].id), 'refund.created');
    expect((await postWebhook(new Client(), created.payload)).status).toBe(200);
    let after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.refunds[0]).toMatchObject({ amountCents: 7_000, reason: 'Dead gate latch', stripeRefund: atStripe.data[0].id });
    expect(after.paidCents).toBe(T - 7_000);
    // Asking again with the same key: done already, nothing new at Stripe or here.
    const retry = await ask();
    expect(retry.status, retry.text).toBe(200);
    // Every event of the payment again, newest first: nothing changes.
    for (const e of (await fakeEvents(intent)).reverse()) expect((await postWebhook(new Client(), e.payload)).status).toBe(200);
    after = await getInvoice(co.owner, inv.id);
    expect(after.refunds).toHaveLength(1);
    expect(after.paidCents).toBe(T - 7_000);
    expect((await stripeOutside().refunds.list({ payment_intent: intent })).data).toHaveLength(1);
    expect(await testDb()('stripe_refunds').where({ organization_id: co.id, payment_id: pay.id })).toMatchObject([{ status: 'succeeded', requested_by: expect.any(String) }]);
  });

  it('asks Stripe again with the same key when the first answer was not saved, and records one refund', async () => {
    const { inv, intent, pay } = await paidInvoice(40_000);
    const T = inv.totalCents;
    const undo = await refuseRefundRows(pay.id);
    try {
      await offline(async () => expect((await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 4_000 })).status).toBe(503));
    } finally {
      await undo();
    }
    // No request key: the same amount, still unanswered here, is taken as the same refund.
    const again = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 4_000 });
    expect(again.status, again.text).toBe(200);
    expect(again.body.refunds).toHaveLength(1);
    expect(again.body.paidCents).toBe(T - 4_000);
    expect((await stripeOutside().refunds.list({ payment_intent: intent })).data).toHaveLength(1);
    // A different amount is another refund.
    const more = await co.owner.post(`/api/invoices/${inv.id}/payments/${pay.id}/refund`, { amountCents: 1_000 });
    expect(more.status, more.text).toBe(200);
    expect(more.body.refunds).toHaveLength(2);
    expect((await stripeOutside().refunds.list({ payment_intent: intent })).data).toHaveLength(2);
    for (const e of await fakeEvents(intent)) expect((await postWebhook(new Client(), e.payload)).status).toBe(200);
    expect((await getInvoice(co.owner, inv.id)).refunds).toHaveLength(2);
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
