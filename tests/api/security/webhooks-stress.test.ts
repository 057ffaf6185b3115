import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client } from '../../setup/client';
import { makeCompany, type TestCompany } from '../../setup/factory';
import { closeTestDb, testDb } from '../../setup/db';
import { billableJob, draft, getInvoice, issue, postWebhook } from '../../setup/invoices';
import { rng } from '../../../src/lib/random';
import Stripe from 'stripe';
import { stack } from '../../setup/stack';

let co: TestCompany;
let jobId: number;
beforeAll(async () => {
  co = await makeCompany();
  await co.owner.patch('/api/settings', { taxMode: 'none' });
  jobId = (await billableJob(co, 900_000_000)).job.id;
});
afterAll(async () => {
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

/** One invoice's life at the card processor: a declined try, the paid session, its intent, a partial refund. */
function lifeOf(inv: { id: number; totalCents: number }, tag: string) {
  const meta = { invoice_id: String(inv.id), organization_id: co.id };
  const intent = `pi_test_${tag}`;
  const created = Math.floor(Date.now() / 1000);
  const ev = (name: string, type: string, object: Record<string, unknown>) => JSON.stringify({ id: `evt_test_${tag}_${name}`, object: 'event', type, created, data: { object } });
  return [
    ev('fail', 'payment_intent.payment_failed', { id: `pi_test_${tag}_first`, object: 'payment_intent', amount: inv.totalCents, currency: 'usd', status: 'requires_payment_method', metadata: meta, last_payment_error: { message: 'Your card was declined.', decline_code: 'insufficient_funds' } }),
    ev('session', 'checkout.session.completed', { id: `cs_test_${tag}`, object: 'checkout.session', amount_total: inv.totalCents, currency: 'usd', payment_status: 'paid', payment_intent: intent, metadata: meta }),
    ev('intent', 'payment_intent.succeeded', { id: intent, object: 'payment_intent', amount: inv.totalCents, amount_received: inv.totalCents, currency: 'usd', status: 'succeeded', metadata: meta }),
    ev('refund', 'charge.refunded', { id: `ch_test_${tag}`, object: 'charge', amount: inv.totalCents, amount_refunded: 1_000, payment_intent: intent, metadata: meta, refunds: { object: 'list', data: [{ id: `re_test_${tag}`, amount: 1_000 }] } }),
  ];
}

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
    const [, session] = lifeOf(inv, `ten${inv.id}`);
    const statuses = [];
    for (let i = 0; i < 10; i++) statuses.push((await postWebhook(new Client(), session)).status);
    expect(statuses).toEqual(Array(10).fill(200));
    expect(await state(inv.id)).toMatchObject({ status: 'paid', payments: 1, paidCents: inv.totalCents });
  });

  it('the same event fifty times at once: one payment', async () => {
    const inv = await issuedDeposit();
    const [, , intent] = lifeOf(inv, `fifty${inv.id}`);
    const results = await Promise.all(Array.from({ length: 50 }, () => postWebhook(new Client(), intent)));
    expect(results.map((r) => r.status)).toEqual(Array(50).fill(200));
    expect(await state(inv.id)).toMatchObject({ status: 'paid', payments: 1 });
    expect(await testDb()('stripe_events').where('id', `evt_test_fifty${inv.id}_intent`)).toHaveLength(1);
  });

  it('a session completed but not paid never marks the invoice paid', async () => {
    const inv = await issuedDeposit();
    const meta = { invoice_id: String(inv.id), organization_id: co.id };
    const unpaid = JSON.stringify({ id: `evt_test_unpaid${inv.id}`, object: 'event', type: 'checkout.session.completed', created: Math.floor(Date.now() / 1000), data: { object: { id: `cs_test_unpaid${inv.id}`, object: 'checkout.session', amount_total: inv.totalCents, currency: 'usd', payment_status: 'unpaid', payment_intent: `pi_test_unpaid${inv.id}`, metadata: meta } } });
    expect((await postWebhook(new Client(), unpaid)).status).toBe(200);
    expect(await state(inv.id)).toMatchObject({ status: 'issued', payments: 0, paidCents: 0 });
  });

  it('refuses a body edited or re-serialised after signing', async () => {
    const inv = await issuedDeposit();
    const [, session] = lifeOf(inv, `edit${inv.id}`);
    const c = new Client();
    const signed = new Stripe('sk_test_x').webhooks.generateTestHeaderString({ payload: session, secret: stack().stripeWebhookSecret });
    const reserialised = JSON.stringify(JSON.parse(session), null, 2);
    const edited = session.replace(`"amount_total":${inv.totalCents}`, `"amount_total":${inv.totalCents * 10}`);
    for (const body of [reserialised, edited]) {
      const r = await c.request('POST', '/api/stripe/webhook', { body, headers: { 'content-type': 'application/json', 'stripe-signature': signed }, origin: null });
      expect(r.status).toBe(400);
    }
    expect(await state(inv.id)).toMatchObject({ payments: 0 });
  });

  it('1,000 random delivery orders of an invoice\'s events end as in-order delivery does, with one payment', async () => {
    const inOrder = await issuedDeposit(20_000);
    expect(await deliver(lifeOf(inOrder, `inorder${inOrder.id}`))).toBe(0);
    const expected = await state(inOrder.id);
    expect(expected).toMatchObject({ status: 'partly_paid', payments: 1, refunds: 1, refundedCents: 1_000 });

    const r = rng(20261202);
    const ORDERS = 1000;
    const invoices = [];
    for (let i = 0; i < ORDERS; i += 20) invoices.push(...(await Promise.all(Array.from({ length: Math.min(20, ORDERS - i) }, () => issuedDeposit(20_000)))));
    const stuck: number[] = [];
    for (let i = 0; i < ORDERS; i += 10) {
      await Promise.all(invoices.slice(i, i + 10).map(async (inv, j) => {
        const events = lifeOf(inv, `order${inv.id}`);
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
