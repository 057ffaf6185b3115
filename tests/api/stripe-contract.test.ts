import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Stripe from 'stripe';
import { createStripeFake } from '../../src/fakes/stripe/server';
import { STRIPE_API_VERSION, WEBHOOK_EVENTS } from '../../src/server/payments/stripe';
import { eventTypeName, FIXTURES, loadSdkTypes, newerThanExample, RESOURCE_TYPES, shapeProblems } from '../setup/stripe-shapes';

/**
 * The Stripe stand-in against Stripe itself: every call the app makes and every event it is
 * sent, checked against two sources from outside the project (tests/setup/stripe-shapes.ts):
 * - Stripe's published example objects (tests/fixtures/stripe/openapi-fixtures3.json, a byte-identical
 *   copy of ../shared/reference/stripe-openapi-fixtures3.json, from github.com/stripe/openapi
 *   at f6c2a48, MIT): keys and value types;
 * - stripe-node 23.1.0's types (node_modules/stripe/cjs/resources/*.d.ts), which describe
 *   API version 2026-10-28.endive, the one the app pins: every key Stripe may send, which it
 *   always sends, nullability, enum values, and which fields are ids until expand[] asks.
 * The stand-in runs here on its own port with every event type on and a webhook receiver
 * that verifies each signature with the SDK, so nothing depends on the app.
 */

const SECRET = 'whsec_contract_test';
const received: Stripe.Event[] = [];
let receiver: http.Server;
let fake: http.Server;
let base: string;
let sdk: Stripe;
const checked = new Map<string, number>();

const EVENT_TYPES = [
  'payment_intent.created', 'payment_intent.succeeded', 'payment_intent.payment_failed', 'charge.succeeded', 'charge.failed', 'charge.refunded',
  'charge.refund.updated', 'checkout.session.completed', 'checkout.session.expired', 'refund.created', 'refund.updated', 'refund.failed',
];

/** Every difference from Stripe's shape; counted per resource for the summary. */
function problems(value: unknown, expand: string[] = []): string[] {
  const resource = String((value as { object?: unknown }).object);
  const type = resource === 'list' ? 'Stripe.ApiList<Stripe.Refund>' : RESOURCE_TYPES[resource];
  if (!type) return [`no stripe-node type for "${resource}"`];
  checked.set(resource, (checked.get(resource) ?? 0) + 1);
  return shapeProblems(value, type, expand);
}

function eventProblems(e: Stripe.Event): string[] {
  checked.set(`event ${e.type}`, (checked.get(`event ${e.type}`) ?? 0) + 1);
  return shapeProblems(e, eventTypeName(e.type), [], e.type);
}

async function until<T>(fn: () => T | undefined, what: string, ms = 10_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = fn();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}
const eventFor = (type: string, id: string) => until(() => received.find((e) => e.type === type && (e.data.object as { id?: string }).id === id), `${type} of ${id}`);

/** The parameters the app sends (services/public-invoices.ts startCheckout), with made-up values. */
const checkoutParams = (amount: number): Stripe.Checkout.SessionCreateParams => ({
  mode: 'payment',
  client_reference_id: '42',
  customer_email: 'customer@example.com',
  line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: amount, product_data: { name: 'Example Fence Co — invoice INV-0042', description: 'J-0042 Back yard' } } }],
  metadata: { invoice_id: '42', organization_id: 'org_contract' },
  payment_intent_data: { metadata: { invoice_id: '42', organization_id: 'org_contract' }, description: 'Invoice INV-0042' },
  success_url: 'http://127.0.0.1:4321/pay/tok?paid={CHECKOUT_SESSION_ID}',
  cancel_url: 'http://127.0.0.1:4321/pay/tok?cancelled=1',
});

async function press(session: Stripe.Checkout.Session, action: 'pay' | 'decline', card = '4242 4242 4242 4242') {
  const r = await fetch(`${base}/checkout/${session.id}/${action}`, { method: 'POST', body: new URLSearchParams({ email: 'customer@example.com', card }), redirect: 'manual' });
  expect([200, 303]).toContain(r.status);
}

async function paidSession(amount: number, card?: string) {
  const s = await sdk.checkout.sessions.create(checkoutParams(amount), { idempotencyKey: `contract-${amount}-${Math.random()}` });
  await press(s, 'pay', card);
  const done = await sdk.checkout.sessions.retrieve(s.id);
  return { session: done, intent: done.payment_intent as string };
}

beforeAll(async () => {
  loadSdkTypes([...Object.values(RESOURCE_TYPES), 'Stripe.ApiList<Stripe.Refund>', ...EVENT_TYPES.map(eventTypeName)]);
  const verifier = new Stripe('sk_test_verifier');
  receiver = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c) => chunks.push(c));
    req.on('end', () => {
      try {
        received.push(verifier.webhooks.constructEvent(Buffer.concat(chunks), String(req.headers['stripe-signature']), SECRET));
        res.writeHead(200).end('{}');
      } catch {
        res.writeHead(400).end('{}');
      }
    });
  });
  await new Promise<void>((r) => receiver.listen(0, '127.0.0.1', r));
  const rport = (receiver.address() as AddressInfo).port;
  // The stand-in needs its own address for the hosted page's URL: take a free port first.
  const probe = http.createServer();
  await new Promise<void>((r) => probe.listen(0, '127.0.0.1', r));
  const port = (probe.address() as AddressInfo).port;
  await new Promise<void>((r) => probe.close(() => r()));
  base = `http://127.0.0.1:${port}`;
  fake = createStripeFake({ webhookUrl: `http://127.0.0.1:${rport}/`, webhookSecret: SECRET, publicUrl: base, asyncDelayMs: 100 });
  await new Promise<void>((r) => fake.listen(port, '127.0.0.1', r));
  sdk = new Stripe('sk_test_contract', { host: '127.0.0.1', port, protocol: 'http', apiVersion: STRIPE_API_VERSION, maxNetworkRetries: 0 });
}, 60_000);

afterAll(async () => {
  await new Promise((r) => fake?.close(r));
  await new Promise((r) => receiver?.close(r));
  const summary = [...checked].sort().map(([k, n]) => `${k} ×${n}`).join(', ');
  console.log(`stripe contract: checked ${summary}`);
  if (newerThanExample.size) console.log(`stripe contract: sent because stripe-node ${STRIPE_API_VERSION} always sends them, though Stripe's example predates them: ${[...newerThanExample].sort().join(', ')}`);
});

describe('the check itself', () => {
  it('passes Stripe\'s own example refund and catches each kind of difference', () => {
    const example = structuredClone(FIXTURES.refund);
    expect(shapeProblems(example, 'Stripe.Refund')).toEqual([]);
    const variants: [string, (r: Record<string, unknown>) => void, RegExp][] = [
      ['a key Stripe does not send', (r) => { r.refunds_total = 1; }, /sends "refunds_total"/],
      ['a key Stripe always sends left out', (r) => { delete r.balance_transaction; }, /leaves out "balance_transaction"/],
      ['a number as a string', (r) => { r.amount = '100'; }, /amount: a string/],
      ['null where Stripe never sends null', (r) => { r.currency = null; }, /currency: null/],
      ['an expandable field expanded unasked', (r) => { r.charge = { ...FIXTURES.charge }; }, /charge: the whole object, but expand\[\] did not ask/],
      ['an enum value Stripe does not use', (r) => { r.reason = 'changed_mind'; }, /reason: "changed_mind" is not one of/],
      ['metadata that is not text', (r) => { r.metadata = { n: 1 }; }, /metadata\.n: a number/],
    ];
    for (const [what, change, expected] of variants) {
      const r = structuredClone(FIXTURES.refund);
      change(r);
      expect(shapeProblems(r, 'Stripe.Refund').join('\n'), what).toMatch(expected);
    }
  });

  it('catches what the stand-in used to send in charge.refunded: the refunds list, and a charge missing most of its fields', () => {
    const before = { id: 'ch_test_1', object: 'charge', amount: 5000, amount_refunded: 1000, currency: 'usd', payment_intent: 'pi_test_1', refunded: false, refunds: { object: 'list', data: [{ id: 're_test_1', object: 'refund', amount: 1000 }] }, metadata: {}, paid: true, status: 'succeeded' };
    const found = shapeProblems(before, 'Stripe.Charge');
    expect(found).toContain('Stripe.Charge.refunds: sent, but Stripe sends it only when expand[] asks');
    expect(found.filter((p) => /leaves out/.test(p)).length).toBeGreaterThan(20);
  });
});

describe('the calls the app makes', () => {
  it('are all driven here (a new stripe() call in src/server must be added to this test)', () => {
    const calls = new Set<string>();
    const walk = (dir: string) => {
      for (const f of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, f.name);
        if (f.isDirectory()) walk(p);
        else if (p.endsWith('.ts')) for (const m of fs.readFileSync(p, 'utf8').matchAll(/stripe\(\)\.([\w.]+)\(/g)) calls.add(m[1]);
      }
    };
    walk(path.resolve(__dirname, '../../src/server'));
    const covered = ['checkout.sessions.create', 'checkout.sessions.retrieve', 'checkout.sessions.expire', 'refunds.create', 'refunds.list', 'paymentIntents.retrieve', 'webhooks.constructEvent'];
    expect([...calls].filter((c) => !covered.includes(c))).toEqual([]);
    // And every event the webhook handles is one the endpoint subscribes to (charge.refund.updated, the older name, excepted).
    const handled = [...fs.readFileSync(path.resolve(__dirname, '../../src/server/services/stripe-webhook.ts'), 'utf8').matchAll(/case '([a-z_.]+)'/g)].map((m) => m[1]);
    expect(handled.filter((t) => !(WEBHOOK_EVENTS as readonly string[]).includes(t) && t !== 'charge.refund.updated')).toEqual([]);
    expect(WEBHOOK_EVENTS.filter((t) => !handled.includes(t))).toEqual([]);
  });

  it('the stand-in answers the pinned API version only', async () => {
    expect(Stripe.API_VERSION).toBe(STRIPE_API_VERSION);
    const other = new Stripe('sk_test_contract', { host: '127.0.0.1', port: Number(new URL(base).port), protocol: 'http', apiVersion: '2024-06-20' as never, maxNetworkRetries: 0 });
    const err = await other.checkout.sessions.retrieve('cs_test_x').then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(err?.message).toContain(STRIPE_API_VERSION);
  });

  it('checkout.sessions.create, .retrieve (also with expand[]), .expire', async () => {
    const s = await sdk.checkout.sessions.create(checkoutParams(123_456), { idempotencyKey: 'contract-create' });
    expect(problems(s)).toEqual([]);
    expect(s).toMatchObject({ status: 'open', payment_status: 'unpaid', amount_total: 123_456, payment_intent: null, metadata: { invoice_id: '42' } });
    expect('line_items' in s).toBe(false);
    expect(problems(await sdk.checkout.sessions.retrieve(s.id))).toEqual([]);
    await press(s, 'pay');
    const plain = await sdk.checkout.sessions.retrieve(s.id);
    expect(problems(plain)).toEqual([]);
    expect(typeof plain.payment_intent).toBe('string');
    const expanded = await sdk.checkout.sessions.retrieve(s.id, { expand: ['payment_intent', 'payment_intent.latest_charge'] });
    expect(problems(expanded, ['payment_intent', 'payment_intent.latest_charge'])).toEqual([]);
    expect((expanded.payment_intent as Stripe.PaymentIntent).object).toBe('payment_intent');

    const open = await sdk.checkout.sessions.create(checkoutParams(5_000), { idempotencyKey: 'contract-expire' });
    const expired = await sdk.checkout.sessions.expire(open.id);
    expect(problems(expired)).toEqual([]);
    expect(expired).toMatchObject({ status: 'expired', url: null });
    const again = await sdk.checkout.sessions.expire(open.id).then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(again).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
  });

  it('paymentIntents.retrieve, with latest_charge and the charge\'s refunds only when expanded', async () => {
    const { intent } = await paidSession(40_000);
    const pi = await sdk.paymentIntents.retrieve(intent);
    expect(problems(pi)).toEqual([]);
    expect(pi).toMatchObject({ status: 'succeeded', amount_received: 40_000, metadata: { invoice_id: '42', organization_id: 'org_contract' } });
    expect(typeof pi.latest_charge).toBe('string');
    const withCharge = await sdk.paymentIntents.retrieve(intent, { expand: ['latest_charge'] });
    expect(problems(withCharge, ['latest_charge'])).toEqual([]);
    const charge = withCharge.latest_charge as Stripe.Charge;
    // Source: stripe-node CHANGELOG and Stripe's 2022-11-15 changelog, Charge.refunds is no longer included.
    expect('refunds' in charge).toBe(false);
    const withRefunds = await sdk.paymentIntents.retrieve(intent, { expand: ['latest_charge.refunds'] });
    expect(problems(withRefunds, ['latest_charge.refunds'])).toEqual([]);
    expect((withRefunds.latest_charge as Stripe.Charge).refunds).toMatchObject({ object: 'list', data: [] });
    const missing = await sdk.paymentIntents.retrieve('pi_test_nothere').then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(missing).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    expect(missing).toMatchObject({ code: 'resource_missing', statusCode: 404 });
  });

  it('refunds.create (idempotent), refunds.list by charge (paged through the SDK, also with expand[])', async () => {
    const { intent } = await paidSession(90_000);
    const params = { payment_intent: intent, amount: 10_000, metadata: { invoice_id: '42', organization_id: 'org_contract', payment_id: '7', refund_request_id: '9' } };
    const r = await sdk.refunds.create(params, { idempotencyKey: 'contract-refund-9' });
    expect(problems(r)).toEqual([]);
    expect(r).toMatchObject({ status: 'succeeded', amount: 10_000, payment_intent: intent, metadata: params.metadata });
    expect(typeof r.charge).toBe('string');
    const replay = await sdk.refunds.create(params, { idempotencyKey: 'contract-refund-9' });
    expect(replay.id).toBe(r.id);
    const refused = await sdk.refunds.create({ ...params, amount: 10_001 }, { idempotencyKey: 'contract-refund-9' }).then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(refused).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);
    for (let i = 0; i < 3; i++) await sdk.refunds.create({ payment_intent: intent, amount: 1_000 });
    const tooMuch = await sdk.refunds.create({ payment_intent: intent, amount: 90_000 }).then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(tooMuch).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);

    const page = await sdk.refunds.list({ charge: r.charge as string, limit: 2 });
    expect(problems(page)).toEqual([]);
    expect(page).toMatchObject({ object: 'list', has_more: true, url: '/v1/refunds' });
    const all: Stripe.Refund[] = [];
    for await (const x of sdk.refunds.list({ charge: r.charge as string, limit: 2 })) all.push(x);
    expect(all.map((x) => x.amount).sort((a, b) => a - b)).toEqual([1_000, 1_000, 1_000, 10_000]);
    const expanded = await sdk.refunds.list({ charge: r.charge as string, limit: 100, expand: ['data.charge', 'data.payment_intent'] });
    expect(problems(expanded, ['data.charge', 'data.payment_intent'])).toEqual([]);
    expect((expanded.data[0].charge as Stripe.Charge).amount_refunded).toBe(13_000);
    const bad = await sdk.refunds.list({ charge: r.charge as string, expand: ['data.balance_transaction.nope'] }).then(() => null, (e: Stripe.errors.StripeError) => e);
    expect(bad).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
  });
});

describe('the events the stand-in sends', () => {
  it('a declined try, then the payment: payment_intent.*, charge.*, checkout.session.completed', async () => {
    const s = await sdk.checkout.sessions.create(checkoutParams(77_700));
    await press(s, 'decline');
    const pi = (await sdk.checkout.sessions.retrieve(s.id)).payment_intent as string;
    const failed = await eventFor('payment_intent.payment_failed', pi);
    expect(eventProblems(failed)).toEqual([]);
    expect((failed.data.object as Stripe.PaymentIntent).last_payment_error).toMatchObject({ code: 'card_declined', type: 'card_error' });
    await press(s, 'pay');
    const succeeded = await eventFor('payment_intent.succeeded', pi);
    expect(eventProblems(succeeded)).toEqual([]);
    const completed = await eventFor('checkout.session.completed', s.id);
    expect(eventProblems(completed)).toEqual([]);
    // Checkout keeps one PaymentIntent for the session's tries (Stripe's Checkout docs).
    expect((completed.data.object as Stripe.Checkout.Session).payment_intent).toBe(pi);
    for (const type of ['payment_intent.created', 'charge.failed', 'charge.succeeded']) {
      const e = await until(() => received.find((x) => x.type === type && (x.data.object as { payment_intent?: string; id?: string }).payment_intent === pi || (x.type === type && (x.data.object as { id?: string }).id === pi)), type);
      expect(eventProblems(e), type).toEqual([]);
    }
  });

  it('a refund: refund.created and charge.refunded, whose charge lists no refunds', async () => {
    const { intent } = await paidSession(60_000);
    const r = await sdk.refunds.create({ payment_intent: intent, amount: 6_000 });
    const created = await eventFor('refund.created', r.id);
    expect(eventProblems(created)).toEqual([]);
    expect(created.data.object).toMatchObject({ id: r.id, status: 'succeeded', amount: 6_000 });
    expect(created.request?.id).toMatch(/^req_/);
    const refunded = await eventFor('charge.refunded', r.charge as string);
    expect(eventProblems(refunded)).toEqual([]);
    const charge = refunded.data.object as Stripe.Charge;
    expect(charge).toMatchObject({ amount_refunded: 6_000, refunded: false });
    expect('refunds' in charge).toBe(false);
    expect(refunded.data.previous_attributes).toEqual({ amount_refunded: 0 });
  });

  it('a refund that fails later (Stripe\'s test card 4000 0000 0000 5126): refund.updated, refund.failed, charge.refund.updated', async () => {
    const { intent } = await paidSession(30_000, '4000 0000 0000 5126');
    const r = await sdk.refunds.create({ payment_intent: intent, amount: 30_000 });
    expect(r.status).toBe('succeeded');
    for (const type of ['refund.updated', 'refund.failed', 'charge.refund.updated']) {
      const e = await eventFor(type, r.id);
      expect(eventProblems(e), type).toEqual([]);
      expect(e.data.object).toMatchObject({ status: 'failed', failure_reason: 'expired_or_canceled_card' });
      if (type !== 'refund.failed') expect(e.data.previous_attributes).toMatchObject({ status: 'succeeded', failure_reason: null });
    }
    const after = await sdk.paymentIntents.retrieve(intent, { expand: ['latest_charge'] });
    expect((after.latest_charge as Stripe.Charge).amount_refunded).toBe(0);
    const listed = await sdk.refunds.list({ charge: r.charge as string });
    expect(problems(listed)).toEqual([]);
    expect(listed.data[0]).toMatchObject({ id: r.id, status: 'failed' });
  });

  it('a refund pending first (test card 4000 0000 0000 7726), then succeeded', async () => {
    const { intent } = await paidSession(20_000, '4000 0000 0000 7726');
    const r = await sdk.refunds.create({ payment_intent: intent, amount: 5_000 });
    expect(problems(r)).toEqual([]);
    expect(r.status).toBe('pending');
    const updated = await eventFor('refund.updated', r.id);
    expect(eventProblems(updated)).toEqual([]);
    expect(updated.data.object).toMatchObject({ status: 'succeeded' });
    expect(updated.data.previous_attributes).toMatchObject({ status: 'pending' });
  });

  it('an expired session: checkout.session.expired', async () => {
    const s = await sdk.checkout.sessions.create(checkoutParams(1_000));
    await sdk.checkout.sessions.expire(s.id);
    expect(eventProblems(await eventFor('checkout.session.expired', s.id))).toEqual([]);
  });

  it('every event sent was signed, and all of them match Stripe\'s shape; each type the app subscribes to was seen', () => {
    expect(received.length).toBeGreaterThan(20);
    const wrong = received.flatMap((e) => shapeProblems(e, eventTypeName(e.type), [], `${e.type} ${e.id}`));
    expect(wrong).toEqual([]);
    expect(received.every((e) => e.api_version === STRIPE_API_VERSION && e.object === 'event' && e.livemode === false)).toBe(true);
    const seen = new Set<string>(received.map((e) => e.type));
    // checkout.session.async_payment_succeeded comes only for payment methods that settle later
    // (bank debits); the stand-in takes cards, which settle at once.
    expect(WEBHOOK_EVENTS.filter((t) => !seen.has(t) && t !== 'checkout.session.async_payment_succeeded')).toEqual([]);
    expect(EVENT_TYPES.filter((t) => !seen.has(t))).toEqual([]);
    expect(Object.keys(FIXTURES)).toEqual(expect.arrayContaining(['charge', 'refund', 'payment_intent', 'checkout.session', 'event']));
  });
});
