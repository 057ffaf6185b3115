import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client } from '../../setup/client';
import { makeCompany, type TestCompany } from '../../setup/factory';
import { closeTestDb, testDb } from '../../setup/db';
import { billableJob, draft, fakeEvents, getInvoice, issue, postWebhook, stripeOutside, webhookEndpoint } from '../../setup/invoices';
import { rng } from '../../../src/lib/random';
import Stripe from 'stripe';
import { stack } from '../../setup/stack';

let co: TestCompany;
let jobId: number;
beforeAll(async () => {
  co = await makeCompany();
  await co.owner.patch('/api/settings', { taxMode: 'none' });
  jobId = (await billableJob(co, 900_000_000)).job.id;
  // Every invoice's events are made at the stand-in with the app's endpoint off and
  // delivered by the tests below, in the orders they choose.
  await webhookEndpoint(true);
});
afterAll(async () => {
  await webhookEndpoint(false);
  // A thousand receipts are queued here: let the worker send them before the next file, whose
  // own mail would otherwise wait behind them.
  const until = Date.now() + 120_000;
  while (Date.now() < until) {
    const row = await testDb()('outbox').where('organization_id', co.id).whereIn('status', ['pending', 'sending']).count({ n: '*' }).first();
    if (Number(row?.n ?? 0) === 0) break;
    await new Promise((r) => setTimeout(r, 500));
  }
  await closeTestDb();
});

async function issuedDeposit(cents = 10_000) {
  return issue(co.owner, (await draft(co.owner, { jobId, kind: 'deposit', requestedCents: cents, overDepositCapOk: true, overrideReason: 'Webhook test' })).id);
}

const sdk = stripeOutside();

/** Presses a button on the hosted page as the customer's browser would. */
async function press(sessionUrl: string, action: 'pay' | 'decline') {
  const r = await fetch(`${sessionUrl}/${action}`, { method: 'POST', body: 'card=4242424242424242', headers: { 'content-type': 'application/x-www-form-urlencoded' }, redirect: 'manual' });
  await r.arrayBuffer();
  if (r.status !== 200 && r.status !== 303) throw new Error(`hosted page ${action}: ${r.status}`);
}

/**
 * One invoice's life at the card processor, made at the stand-in as Stripe makes it: the
 * Checkout Session the app would open (its metadata), a declined try, the payment, and a
 * partial refund made at Stripe outside Tallypost. Returns the events Stripe sent for it
 * (real shapes: the charge in charge.refunded carries no refunds), by name.
 */
async function lifeOf(inv: { id: number; totalCents: number }) {
  const meta = { invoice_id: String(inv.id), organization_id: co.id };
  const session = await sdk.checkout.sessions.create({
    mode: 'payment', success_url: 'http://127.0.0.1/ok', cancel_url: 'http://127.0.0.1/no', metadata: meta, payment_intent_data: { metadata: meta },
    line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: inv.totalCents, product_data: { name: `Invoice ${inv.id}` } } }],
  });
  await press(session.url!, 'decline');
  await press(session.url!, 'pay');
  const intent = (await sdk.checkout.sessions.retrieve(session.id)).payment_intent as string;
  await sdk.refunds.create({ payment_intent: intent, amount: 1_000 });
  const events = await fakeEvents(intent);
  const one = (type: string) => {
    const e = events.filter((x) => x.type === type);
    if (e.length !== 1) throw new Error(`${type}: ${e.length} events for ${intent}`);
    return e[0].payload;
  };
  return {
    fail: one('payment_intent.payment_failed'), session: one('checkout.session.completed'), intent: one('payment_intent.succeeded'),
    refund: one('refund.created'), refunded: one('charge.refunded'),
  };
}
const allOf = (l: Awaited<ReturnType<typeof lifeOf>>) => [l.fail, l.session, l.intent, l.refund, l.refunded];

async function state(invoiceId: number) {
  const inv = await getInvoice(co.owner, invoiceId);
  const refunds = await testDb()('refunds').where({ organization_id: co.id, invoice_id: invoiceId }).sum({ s: 'amount_cents' }).count({ n: '*' }).first();
  return { status: inv.status, paidCents: inv.paidCents, balanceCents: inv.balanceCents, payments: inv.payments.length, refunds: Number(refunds?.n ?? 0), refundedCents: Number(refunds?.s ?? 0) };
}

/** Delivers events in the given order; what was refused is delivered again until taken, as Stripe retries. */
async function deliver(order: string[]) {
  const c = new Client();
  let pending = order;
  for (let round = 0; pending.length && round < 5; round++) {
    const refused: string[] = [];
    for (const e of pending) {
      const r = await postWebhook(c, e);
      if (r.status >= 500) throw new Error(`webhook 5xx: ${r.status} ${r.text}`);
      if (r.status !== 200) refused.push(e);
    }
    pending = refused;
  }
  return pending.length;
}

describe('webhook deliveries under stress', () => {
  it('the same event ten times in a row: one payment, every answer 2xx', async () => {
    const inv = await issuedDeposit();
    const { session } = await lifeOf(inv);
    const statuses = [];
    for (let i = 0; i < 10; i++) statuses.push((await postWebhook(new Client(), session)).status);
    expect(statuses).toEqual(Array(10).fill(200));
    expect(await state(inv.id)).toMatchObject({ status: 'paid', payments: 1, paidCents: inv.totalCents });
  });

  it('the same event fifty times at once: one payment', async () => {
    const inv = await issuedDeposit();
    const { intent } = await lifeOf(inv);
    const results = await Promise.all(Array.from({ length: 50 }, () => postWebhook(new Client(), intent)));
    expect(results.map((r) => r.status)).toEqual(Array(50).fill(200));
    expect(await state(inv.id)).toMatchObject({ status: 'paid', payments: 1 });
    expect(await testDb()('stripe_events').where('id', JSON.parse(intent).id)).toHaveLength(1);
  });

  it('the refund\'s two events fifty times at once, after the payment: one refund', async () => {
    const inv = await issuedDeposit();
    const life = await lifeOf(inv);
    expect((await postWebhook(new Client(), life.session)).status).toBe(200);
    const results = await Promise.all(Array.from({ length: 50 }, (_, i) => postWebhook(new Client(), i % 2 ? life.refund : life.refunded)));
    expect(results.map((r) => r.status)).toEqual(Array(50).fill(200));
    expect(await state(inv.id)).toMatchObject({ status: 'partly_paid', payments: 1, refunds: 1, refundedCents: 1_000 });
  });

  it('a session completed but not paid never marks the invoice paid', async () => {
    const inv = await issuedDeposit();
    // Stripe sends this for payment methods that settle later (bank debits): the stand-in takes
    // only cards, so a real completed session is turned into one (a new event id, unpaid).
    const { session } = await lifeOf(inv);
    const ev = JSON.parse(session);
    Object.assign(ev, { id: `${ev.id}_unpaid` });
    Object.assign(ev.data.object, { payment_status: 'unpaid' });
    const unpaid = JSON.stringify(ev, null, 2);
    expect((await postWebhook(new Client(), unpaid)).status).toBe(200);
    expect(await state(inv.id)).toMatchObject({ status: 'issued', payments: 0, paidCents: 0 });
  });

  it('refuses a body edited or re-serialised after signing', async () => {
    const inv = await issuedDeposit();
    const { session } = await lifeOf(inv);
    const c = new Client();
    const signed = new Stripe('sk_test_x').webhooks.generateTestHeaderString({ payload: session, secret: stack().stripeWebhookSecret });
    const reserialised = JSON.stringify(JSON.parse(session));
    const edited = session.replace(`"amount_total": ${inv.totalCents}`, `"amount_total": ${inv.totalCents * 10}`);
    expect(edited).not.toBe(session);
    for (const body of [reserialised, edited]) {
      const r = await c.request('POST', '/api/stripe/webhook', { body, headers: { 'content-type': 'application/json', 'stripe-signature': signed }, origin: null });
      expect(r.status).toBe(400);
    }
    expect(await state(inv.id)).toMatchObject({ payments: 0 });
  });

  it('1,000 random delivery orders of an invoice\'s events end as in-order delivery does, with one payment', async () => {
    const inOrder = await issuedDeposit(20_000);
    expect(await deliver(allOf(await lifeOf(inOrder)))).toBe(0);
    const expected = await state(inOrder.id);
    expect(expected).toMatchObject({ status: 'partly_paid', payments: 1, refunds: 1, refundedCents: 1_000 });

    const r = rng(20261202);
    const ORDERS = 1000;
    const invoices = [];
    for (let i = 0; i < ORDERS; i += 20) invoices.push(...(await Promise.all(Array.from({ length: Math.min(20, ORDERS - i) }, () => issuedDeposit(20_000)))));
    const stuck: number[] = [];
    for (let i = 0; i < ORDERS; i += 10) {
      await Promise.all(invoices.slice(i, i + 10).map(async (inv, j) => {
        const events = allOf(await lifeOf(inv));
        // Each event arrives one to three times, all shuffled together.
        const deliveries = events.flatMap((e) => Array(1 + r.int(0, 2)).fill(e) as string[]);
        for (let k = deliveries.length - 1; k > 0; k--) { const m = r.int(0, k); [deliveries[k], deliveries[m]] = [deliveries[m], deliveries[k]]; }
        if (await deliver(deliveries)) stuck.push(i + j);
      }));
    }
    expect(stuck).toEqual([]);
    const rows = await testDb()('invoices as i')
      .where('i.organization_id', co.id)
      .whereIn('i.id', invoices.map((x) => x.id))
      .select('i.id', 'i.status', 'i.paid_cents',
        testDb().raw('(SELECT COUNT(*) FROM payments p WHERE p.invoice_id = i.id) AS payments'),
        testDb().raw('(SELECT COALESCE(SUM(amount_cents), 0) FROM refunds f WHERE f.invoice_id = i.id) AS refunded'));
    const differing = rows.filter((x) => x.status !== expected.status || Number(x.paid_cents) !== expected.paidCents || Number(x.payments) !== 1 || Number(x.refunded) !== expected.refundedCents);
    console.log(`webhook orders: ${rows.length} invoices, ${differing.length} ended differently from in-order delivery`);
    expect(differing).toEqual([]);
  }, 600_000);
});
