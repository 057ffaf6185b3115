import Stripe from 'stripe';
import { expect } from 'vitest';
import type { Client } from './client';
import { makeCustomer, makeJob, type TestCompany } from './factory';
import { testDb } from './db';
import { stack } from './stack';

async function ok<T = any>(p: Promise<{ status: number; body: T; text: string }>, what: string): Promise<T> {
  const r = await p;
  if (r.status >= 300) throw new Error(`${what}: ${r.status} ${r.text.slice(0, 400)}`);
  return r.body;
}

/**
 * A job with a contract price and a customer with an e-mail address. The contract is set in
 * the database the way accepting a bid sets it; estimates split 55 % materials.
 */
export async function billableJob(co: TestCompany, contractCents = 1_000_000, extra: Record<string, unknown> = {}) {
  const customer = await makeCustomer(co.owner);
  const email = (await co.owner.get(`/api/customers/${customer.id}`)).body.email as string;
  const job = await makeJob(co.owner, customer.id, { status: 'won', ...extra });
  await testDb()('jobs').where({ id: job.id, organization_id: co.id }).update({ contract_cents: contractCents });
  const cost = Math.round(contractCents * 0.7);
  await testDb()('job_estimates').insert([
    { organization_id: co.id, job_id: job.id, category: 'material', amount_cents: Math.round(cost * 0.55), source: 'bid' },
    { organization_id: co.id, job_id: job.id, category: 'labour', amount_cents: cost - Math.round(cost * 0.55), source: 'bid' },
  ]);
  return { job, customer, email };
}

export const draft = (c: Client, body: Record<string, unknown>) => ok(c.post('/api/invoices', { terms: 'net_15', ...body }), 'draft');
export const issue = (c: Client, id: number) => ok(c.post(`/api/invoices/${id}/issue`), 'issue');
export const send = (c: Client, id: number) => ok(c.post(`/api/invoices/${id}/send`), 'send');
export const getInvoice = (c: Client, id: number) => ok(c.get(`/api/invoices/${id}`), 'get invoice');

/** The customer's link in an e-mail body. */
export function payLink(text: string): string {
  const m = /https?:\/\/[^\s"<>]+\/pay\/[A-Za-z0-9._-]+/.exec(text);
  if (!m) throw new Error(`no pay link in: ${text.slice(0, 300)}`);
  return m[0];
}

/**
 * Presses a button on the stand-in's hosted page, as the customer's browser would; returns
 * where it sends them. `card` is one of Stripe's test card numbers (the page lists them).
 */
export async function hostedPage(sessionUrl: string, action: 'pay' | 'decline' | 'cancel', card = '4242424242424242'): Promise<{ status: number; location: string | null; html: string }> {
  const page = await fetch(sessionUrl);
  expect(page.status).toBe(200);
  const res = await fetch(`${sessionUrl}/${action}`, { method: 'POST', body: new URLSearchParams({ email: 'x', card }).toString(), headers: { 'content-type': 'application/x-www-form-urlencoded' }, redirect: 'manual' });
  return { status: res.status, location: res.headers.get('location'), html: await res.text() };
}

export interface FakeEvent { id: string; type: string; payload: string; delivered: boolean; deliveries: { status: number }[] }

/** The events the stand-in made for the app's endpoint; `contains` keeps those whose body has that text (an id). */
export async function fakeEvents(contains?: string): Promise<FakeEvent[]> {
  return (await fetch(`${stack().stripeApi}/_fake/events${contains ? `?contains=${encodeURIComponent(contains)}` : ''}`)).json() as Promise<FakeEvent[]>;
}

/**
 * Turns the app's webhook endpoint at the stand-in off (events are made and listed, not sent)
 * or on, so a test can deliver them itself in an order of its choosing. Test files run one
 * at a time; turn it back on in a finally.
 */
export async function webhookEndpoint(disabled: boolean): Promise<void> {
  const r = await fetch(`${stack().stripeApi}/_fake/endpoint`, { method: 'POST', body: JSON.stringify({ disabled }) });
  expect((await r.json()).disabled).toBe(disabled);
}

/** The Stripe SDK against the stack's stand-in, as someone using Stripe's dashboard or API outside Tallypost. */
export function stripeOutside(): Stripe {
  const api = new URL(stack().stripeApi);
  return new Stripe('sk_test_outside', { host: api.hostname, port: Number(api.port), protocol: 'http', maxNetworkRetries: 0 });
}

/**
 * An invoice's life at the card processor, made at the stand-in with the app's endpoint off:
 * the Checkout Session the app would make (its metadata), a declined try, the payment, and a
 * partial refund made outside Tallypost. Returns the events Stripe made for it, in the order
 * made, for the caller to deliver as it likes.
 */
export async function cardLife(companyId: string, inv: { id: number; totalCents: number }, opts: { refundCents?: number; card?: string; decline?: boolean } = {}) {
  const sdk = stripeOutside();
  const meta = { invoice_id: String(inv.id), organization_id: companyId };
  const session = await sdk.checkout.sessions.create({
    mode: 'payment', success_url: 'http://127.0.0.1/ok', cancel_url: 'http://127.0.0.1/no', metadata: meta, payment_intent_data: { metadata: meta },
    line_items: [{ quantity: 1, price_data: { currency: 'usd', unit_amount: inv.totalCents, product_data: { name: `Invoice ${inv.id}` } } }],
  });
  if (opts.decline !== false) await hostedPage(session.url!, 'decline');
  const paid = await hostedPage(session.url!, 'pay', opts.card);
  expect(paid.status).toBe(303);
  const intent = (await sdk.checkout.sessions.retrieve(session.id)).payment_intent as string;
  const refund = opts.refundCents ? await sdk.refunds.create({ payment_intent: intent, amount: opts.refundCents }) : null;
  return { session: session.id, intent, refund, events: await fakeEvents(intent) };
}

const signer = new Stripe('sk_test_signer');

/** Posts an event body to the app's webhook, signed with the stack's secret (or another), at a chosen time. */
export async function postWebhook(client: Client, payload: string, opts: { secret?: string; timestamp?: number } = {}) {
  const header = signer.webhooks.generateTestHeaderString({ payload, secret: opts.secret ?? stack().stripeWebhookSecret, timestamp: opts.timestamp });
  return client.request('POST', '/api/stripe/webhook', { body: payload, headers: { 'content-type': 'application/json', 'stripe-signature': header }, origin: null });
}

export async function waitFor<T>(fn: () => Promise<T>, okWhen: (v: T) => boolean, timeoutMs = 20_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (okWhen(v)) return v;
    if (Date.now() > until) throw new Error(`condition not met in ${timeoutMs} ms: ${JSON.stringify(v).slice(0, 300)}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/**
 * Ids for the billing routes, in the shape the permission-matrix test's FIXTURES take
 * ({ pattern: { params(co) } }): each call makes fresh records in the company.
 */
export const BILLING_FIXTURES: Record<string, { params: (co: TestCompany) => Promise<Record<string, string>> }> = (() => {
  const draftId = async (co: TestCompany) => String((await draft(co.owner, { jobId: (await billableJob(co)).job.id, kind: 'deposit', basisPct: 10 })).id);
  const issued = async (co: TestCompany) => issue(co.owner, Number(await draftId(co)));
  const token = async (co: TestCompany) => ({ token: ((await issued(co)).publicUrl as string).split('/pay/')[1] });
  const byId = { params: async (co: TestCompany) => ({ id: await draftId(co) }) };
  return {
    '/api/invoices/[id]': byId,
    '/api/invoices/[id]/issue': byId,
    '/api/invoices/[id]/send': byId,
    '/api/invoices/[id]/void': { params: async (co) => ({ id: String((await issued(co)).id) }) },
    '/api/invoices/[id]/pdf': { params: async (co) => ({ id: String((await issued(co)).id) }) },
    '/api/invoices/[id]/link': { params: async (co) => ({ id: String((await issued(co)).id) }) },
    '/api/invoices/[id]/payments': { params: async (co) => ({ id: String((await issued(co)).id) }) },
    '/api/invoices/[id]/payments/[paymentId]/refund': {
      params: async (co) => {
        const inv = await issued(co);
        const p = await co.owner.post(`/api/invoices/${inv.id}/payments`, { amountCents: 1_000, method: 'check', receivedOn: inv.today });
        return { id: String(inv.id), paymentId: String(p.body.paymentId) };
      },
    },
    '/api/change-orders/[id]/decision': {
      params: async (co) => {
        const { job } = await billableJob(co);
        return { id: String((await co.owner.post('/api/change-orders', { jobId: job.id, description: 'Probe change', priceCents: 1_000 })).body.id) };
      },
    },
    '/api/public/invoices/[token]/checkout': { params: token },
    '/api/public/invoices/[token]/pdf': { params: token },
  };
})();
