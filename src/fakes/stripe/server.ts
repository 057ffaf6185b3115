import http from 'node:http';
import { randomBytes } from 'node:crypto';
import Stripe from 'stripe';
import {
  chargeRefunds, chargeView, expand, ExpandError, intentView, listView, newId, now, refundView, sessionView, TEST_CARDS,
  type CardBehaviour, type ChargeRec, type IntentRec, type Obj, type RefundRec, type SessionRec, type Store,
} from './objects.ts';

export interface StripeFakeOptions {
  webhookUrl: string;
  webhookSecret: string;
  publicUrl: string;
  /**
   * The event types the webhook endpoint subscribes to, as configured at Stripe (the app's
   * WEBHOOK_EVENTS); every other event is made but not sent. Left out: every type.
   */
  enabledEvents?: readonly string[];
  /** How long a refund stays in its first state before an asynchronous change (refund_fails, refund_pending cards). */
  asyncDelayMs?: number;
}

/** The only API version this stand-in answers: the one the SDK (and so the app) pins. */
export const STAND_IN_API_VERSION = Stripe.API_VERSION;

/** Stripe's form encoding (a[b][0][c]=v) back into nested objects and arrays. */
export function parseForm(body: string): Obj {
  const out: Obj = {};
  for (const [rawKey, value] of new URLSearchParams(body)) {
    const keys = rawKey.replace(/\]/g, '').split('[');
    let node: Obj | unknown[] = out;
    keys.forEach((k, i) => {
      const last = i === keys.length - 1;
      const nextIsIndex = !last && /^\d*$/.test(keys[i + 1]);
      const slot = node as Record<string, unknown>;
      if (last) {
        if (Array.isArray(node) && k === '') (node as unknown[]).push(value);
        else slot[k] = value;
      } else {
        slot[k] ??= nextIsIndex ? [] : {};
        node = slot[k] as Obj;
      }
    });
  }
  return out;
}

function esc(s: unknown): string {
  return String(s ?? '').replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/** The parameters with keys sorted, so the same request compares equal however it was encoded. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v && typeof v === 'object') return `{${Object.keys(v).sort().map((k) => `${JSON.stringify(k)}:${canonical((v as Obj)[k])}`).join(',')}}`;
  return JSON.stringify(v);
}

function money(amount: number, currency: string): string {
  return new Intl.NumberFormat('en-US', { style: 'currency', currency: currency.toUpperCase() }).format(amount / 100);
}

function strings(v: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  if (v && typeof v === 'object' && !Array.isArray(v)) for (const [k, x] of Object.entries(v)) out[k] = String(x);
  return out;
}

function expandList(params: Obj): string[] {
  const e = params.expand;
  if (Array.isArray(e)) return e.map(String);
  if (e && typeof e === 'object') return Object.values(e).map(String);
  return typeof e === 'string' ? [e] : [];
}

type Answer = { status: number; body: unknown; after?: () => void };
const missing = (kind: string, id: string, param?: string): Answer => ({
  status: 404,
  body: { error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such ${kind}: '${id}'`, ...(param ? { param } : {}) } },
});
const invalid = (message: string, extra: Obj = {}): Answer => ({ status: 400, body: { error: { type: 'invalid_request_error', message, ...extra } } });

interface EventRec { id: string; type: string; payload: string; delivered: boolean; deliveries: { status: number; at: number }[] }

/**
 * A local stand-in for the parts of the Stripe API that Tallypost calls, answering in the
 * shapes of the pinned API version (see objects.ts): Checkout Sessions (create, retrieve,
 * expire), PaymentIntents (retrieve), refunds (create, list), `expand[]` on the fields those
 * resources expand, idempotency keys kept as Stripe keeps them, a hosted pay page whose
 * card number picks what happens (Stripe's test cards), and signed webhooks of the events
 * Stripe sends for each step, posted back to the app for the types its endpoint subscribes to.
 *
 * Test-only surface, never used by the app: GET /_fake/events (?contains=text) lists the
 * events made, with their deliveries; POST /_fake/endpoint {"disabled": true|false} turns the
 * endpoint off and on, as Stripe's dashboard can (events made meanwhile are kept, not sent).
 */
export function createStripeFake(opts: StripeFakeOptions): http.Server {
  const st: Store = { sessions: new Map(), intents: new Map(), charges: new Map(), refunds: new Map(), publicUrl: opts.publicUrl };
  const enabled = opts.enabledEvents ? new Set(opts.enabledEvents) : null;
  const asyncDelay = opts.asyncDelayMs ?? 400;
  /** Stripe keeps a key's first answer for 24 h and refuses the key with other parameters. */
  const idempotent = new Map<string, { status: number; body: string; request: string }>();
  const inFlight = new Set<string>();
  const events: EventRec[] = [];
  let endpointDisabled = false;
  const signer = new Stripe('sk_test_signer');

  async function deliver(ev: EventRec): Promise<number> {
    try {
      const header = signer.webhooks.generateTestHeaderString({ payload: ev.payload, secret: opts.webhookSecret });
      const res = await fetch(opts.webhookUrl, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': header }, body: ev.payload });
      ev.deliveries.push({ status: res.status, at: Date.now() });
      await res.arrayBuffer();
      return res.status;
    } catch {
      ev.deliveries.push({ status: 0, at: Date.now() });
      return 0;
    }
  }

  /**
   * Makes an event and sends it now and, like Stripe, again later while the app does not
   * answer 2xx. `request` is the API request that caused it (null for the customer's own
   * actions on the hosted page); `previous` the changed fields' old values (*.updated).
   */
  async function emit(type: string, object: Obj, request: { id: string; key: string | null } | null = null, previous?: Obj): Promise<void> {
    const event = {
      id: newId('evt'), object: 'event', api_version: STAND_IN_API_VERSION, created: now(),
      data: previous ? { object, previous_attributes: previous } : { object },
      livemode: false, pending_webhooks: 1, request: { id: request?.id ?? null, idempotency_key: request?.key ?? null }, type,
    };
    if (enabled && !enabled.has(type)) return;
    const ev: EventRec = { id: event.id, type, payload: JSON.stringify(event, null, 2), delivered: !endpointDisabled, deliveries: [] };
    events.push(ev);
    if (endpointDisabled) return;
    const status = await deliver(ev);
    if (status < 200 || status >= 300) {
      let attempt = 0;
      const retry = async () => {
        if (++attempt > 6) return;
        const s = await deliver(ev);
        if (s < 200 || s >= 300) setTimeout(retry, 1000 * 2 ** attempt).unref();
      };
      setTimeout(retry, 1000).unref();
    }
  }

  function send(res: http.ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}) {
    res.writeHead(status, { 'content-type': 'application/json', 'request-id': headers['request-id'] ?? newId('req'), 'stripe-version': STAND_IN_API_VERSION, ...headers });
    res.end(typeof body === 'string' ? body : JSON.stringify(body));
  }

  function html(res: http.ServerResponse, status: number, title: string, body: string) {
    res.writeHead(status, { 'content-type': 'text/html; charset=utf-8' });
    res.end(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${esc(title)}</title>
<style>body{margin:0;font-family:system-ui,sans-serif;background:#eef1f5;color:#1a1f36}main{max-width:26rem;margin:2rem auto;background:#fff;border-radius:10px;box-shadow:0 2px 12px #0002;padding:1.5rem}
.note{font-size:.75rem;background:#fff7d6;border:1px solid #e8d48a;border-radius:6px;padding:.4rem .6rem;margin-bottom:1rem}h1{font-size:1.1rem;margin:.2rem 0}.amt{font-size:2rem;font-weight:700;margin:.4rem 0 1rem}
label{display:block;font-size:.8rem;color:#555;margin:.6rem 0 .2rem}input{width:100%;box-sizing:border-box;padding:.55rem;border:1px solid #cfd5de;border-radius:6px;font-size:1rem}
button{width:100%;padding:.75rem;border:0;border-radius:6px;font-size:1rem;margin-top:.7rem;cursor:pointer}.pay{background:#3d5afe;color:#fff}.fail{background:#fff;border:1px solid #c62828;color:#c62828}.cancel{background:#fff;border:1px solid #aab;color:#333}
.err{background:#fdecea;color:#8a1c12;border-radius:6px;padding:.5rem .7rem}.cards{font-size:.75rem;color:#555;margin:.3rem 0 0;padding-left:1.1rem}</style></head><body><main>${body}</main></body></html>`);
  }

  function payPage(res: http.ServerResponse, s: SessionRec, message?: string) {
    const cards = Object.entries(TEST_CARDS).map(([n, c]) => `<li><code>${n.replace(/(\d{4})(?=\d)/g, '$1 ')}</code> ${esc(c.label)}</li>`).join('');
    html(res, 200, 'Pay', `<p class="note">Local payment stand-in: no real card is charged.</p>
<p style="color:#666;margin:0">${esc(s.productName)}</p><h1>${esc(s.productDescription)}</h1><p class="amt" data-testid="amount">${money(s.amount, s.currency)}</p>
${message ? `<p class="err" role="alert">${esc(message)}</p>` : ''}
<form method="post" action="/checkout/${esc(s.id)}/pay"><label for="email">E-mail</label><input id="email" name="email" value="${esc(s.customerEmail)}" readonly>
<label for="card">Card number</label><input id="card" name="card" value="4242 4242 4242 4242" inputmode="numeric" autocomplete="off"><ul class="cards">${cards}</ul>
<button class="pay" type="submit">Pay ${money(s.amount, s.currency)}</button></form>
<form method="post" action="/checkout/${esc(s.id)}/decline"><button class="fail" type="submit">Try a card that is declined</button></form>
<form method="post" action="/checkout/${esc(s.id)}/cancel"><button class="cancel" type="submit">Cancel and go back</button></form>`);
  }

  function createSession(p: Obj): SessionRec {
    const items = (p.line_items as Obj[] | undefined) ?? [];
    const amount = items.reduce((a, it) => a + Number((it.price_data as Obj)?.unit_amount ?? 0) * Number(it.quantity ?? 1), 0);
    const pd = (items[0]?.price_data ?? {}) as Obj;
    const product = (pd.product_data ?? {}) as Obj;
    const piData = (p.payment_intent_data ?? {}) as Obj;
    const s: SessionRec = {
      id: newId('cs'), created: now(), expiresAt: now() + 24 * 3600, status: 'open', paymentStatus: 'unpaid', amount, currency: String(pd.currency ?? 'usd').toLowerCase(),
      customerEmail: typeof p.customer_email === 'string' ? p.customer_email : null, clientReferenceId: typeof p.client_reference_id === 'string' ? p.client_reference_id : null,
      metadata: strings(p.metadata), successUrl: String(p.success_url), cancelUrl: String(p.cancel_url ?? p.success_url), paymentIntent: null,
      productName: String(product.name ?? ''), productDescription: String(product.description ?? ''),
      intentMetadata: strings(piData.metadata), intentDescription: typeof piData.description === 'string' ? piData.description : null,
    };
    st.sessions.set(s.id, s);
    return s;
  }

  /** Checkout makes the session's PaymentIntent at the first try to pay, and keeps it for the next tries. */
  async function intentFor(s: SessionRec): Promise<IntentRec> {
    if (s.paymentIntent) return st.intents.get(s.paymentIntent)!;
    const pi: IntentRec = {
      id: newId('pi'), created: now(), amount: s.amount, amountReceived: 0, currency: s.currency, status: 'requires_payment_method', metadata: { ...s.intentMetadata },
      description: s.intentDescription, latestCharge: null, paymentMethod: null, lastError: null, clientSecret: '',
    };
    pi.clientSecret = `${pi.id}_secret_${randomBytes(12).toString('hex')}`;
    st.intents.set(pi.id, pi);
    s.paymentIntent = pi.id;
    await emit('payment_intent.created', intentView(pi));
    return pi;
  }

  function newCharge(pi: IntentRec, s: SessionRec, card: string, behaviour: CardBehaviour, ok: boolean): ChargeRec {
    const ch: ChargeRec = {
      id: newId('ch'), created: now(), amount: pi.amount, amountRefunded: 0, currency: pi.currency, paymentIntent: pi.id,
      // Stripe copies the PaymentIntent's metadata to its charges (from memory of Stripe's behaviour; the app does not rely on it).
      metadata: { ...pi.metadata }, description: pi.description, status: ok ? 'succeeded' : 'failed', paymentMethod: newId('pm'), last4: card.slice(-4),
      fingerprint: randomBytes(8).toString('hex'), email: s.customerEmail, behaviour, balanceTransaction: ok ? newId('txn') : null,
    };
    st.charges.set(ch.id, ch);
    return ch;
  }

  async function pay(s: SessionRec, card: string): Promise<void> {
    const behaviour = TEST_CARDS[card]?.behaviour ?? 'succeeds';
    if (behaviour === 'declined') return decline(s, card);
    const pi = await intentFor(s);
    const ch = newCharge(pi, s, card, behaviour, true);
    Object.assign(pi, { status: 'succeeded', amountReceived: pi.amount, latestCharge: ch.id, paymentMethod: ch.paymentMethod, lastError: null });
    Object.assign(s, { status: 'complete', paymentStatus: 'paid' });
    await emit('charge.succeeded', chargeView(ch, st));
    await emit('payment_intent.succeeded', intentView(pi));
    await emit('checkout.session.completed', sessionView(s, st));
  }

  async function decline(s: SessionRec, card = '4000000000000002'): Promise<void> {
    const pi = await intentFor(s);
    const ch = newCharge(pi, s, card, 'declined', false);
    Object.assign(pi, {
      status: 'requires_payment_method', latestCharge: ch.id, paymentMethod: null,
      lastError: { charge: ch.id, code: 'card_declined', decline_code: 'generic_decline', doc_url: 'https://docs.stripe.com/error-codes/card-declined', message: 'Your card was declined.', type: 'card_error' },
    });
    await emit('charge.failed', chargeView(ch, st));
    await emit('payment_intent.payment_failed', intentView(pi));
  }

  function refund(p: Obj, request: { id: string; key: string | null }): Answer {
    let ch: ChargeRec | undefined;
    if (p.payment_intent !== undefined) {
      const pi = st.intents.get(String(p.payment_intent));
      if (!pi) return missing('payment_intent', String(p.payment_intent), 'payment_intent');
      ch = pi.latestCharge ? st.charges.get(pi.latestCharge) : undefined;
      if (!ch || ch.status !== 'succeeded') return invalid(`This PaymentIntent (${pi.id}) does not have a successful charge to refund.`, { code: 'charge_not_refundable' });
    } else if (p.charge !== undefined) {
      ch = st.charges.get(String(p.charge));
      if (!ch) return missing('charge', String(p.charge), 'charge');
    } else return invalid('One of the following params should be provided for this request: payment_intent or charge.');
    const left = ch.amount - ch.amountRefunded;
    if (left <= 0) return invalid(`Charge ${ch.id} has already been refunded.`, { code: 'charge_already_refunded' });
    const amount = p.amount === undefined ? left : Number(p.amount);
    if (!/^\d+$/.test(String(p.amount ?? left)) || amount <= 0) return invalid(`Invalid positive integer`, { code: 'parameter_invalid_integer', param: 'amount' });
    if (amount > left) return invalid(`Refund amount (${money(amount, ch.currency)}) is greater than unrefunded amount on charge (${money(left, ch.currency)})`, { code: 'amount_too_large', param: 'amount' });
    const reasons = ['duplicate', 'fraudulent', 'requested_by_customer'];
    if (p.reason !== undefined && !reasons.includes(String(p.reason))) return invalid(`Invalid reason: must be one of ${reasons.join(', ')}`, { param: 'reason' });
    const re: RefundRec = {
      id: newId('re'), created: now(), amount, currency: ch.currency, charge: ch.id, paymentIntent: ch.paymentIntent, paymentMethod: ch.paymentMethod, metadata: strings(p.metadata),
      reason: p.reason === undefined ? null : String(p.reason), status: ch.behaviour === 'refund_pending' ? 'pending' : 'succeeded', failureReason: null, failureBalanceTransaction: null,
      balanceTransaction: newId('txn'), destination: now() - ch.created < 30 * 60 ? 'reversal' : 'refund',
    };
    st.refunds.set(re.id, re);
    ch.amountRefunded += amount;
    const charge = ch;
    return {
      status: 200,
      body: refundView(re),
      after: () => {
        void (async () => {
          await emit('refund.created', refundView(re), request);
          await emit('charge.refunded', chargeView(charge, st), request, { amount_refunded: charge.amountRefunded - amount, ...(charge.amountRefunded >= charge.amount ? { refunded: false } : {}) });
        })();
        if (charge.behaviour === 'refund_fails' || charge.behaviour === 'refund_pending') setTimeout(() => void settle(re, charge), asyncDelay).unref();
      },
    };
  }

  /** The asynchronous end of a refund on a refund_fails or refund_pending test card. */
  async function settle(re: RefundRec, ch: ChargeRec): Promise<void> {
    const before = refundView(re);
    if (ch.behaviour === 'refund_fails') {
      Object.assign(re, { status: 'failed', failureReason: 'expired_or_canceled_card', failureBalanceTransaction: newId('txn') });
      ch.amountRefunded -= re.amount;
    } else re.status = 'succeeded';
    const after = refundView(re);
    const previous: Obj = {};
    for (const k of new Set([...Object.keys(before), ...Object.keys(after)])) if (JSON.stringify(before[k]) !== JSON.stringify(after[k])) previous[k] = before[k] ?? null;
    await emit('refund.updated', after, null, previous);
    await emit('charge.refund.updated', after, null, previous);
    if (re.status === 'failed') await emit('refund.failed', after);
  }

  function listRefunds(q: Obj): Answer {
    const limit = q.limit === undefined ? 10 : Number(q.limit);
    if (!Number.isInteger(limit) || limit < 1 || limit > 100) return invalid('Invalid integer: limit must be between 1 and 100', { param: 'limit' });
    let all = [...st.refunds.values()].sort((a, b) => b.created - a.created || (a.id < b.id ? 1 : -1));
    if (q.charge !== undefined) {
      if (!st.charges.has(String(q.charge))) return missing('charge', String(q.charge), 'charge');
      all = chargeRefunds(st, String(q.charge));
    }
    if (q.payment_intent !== undefined) {
      if (!st.intents.has(String(q.payment_intent))) return missing('payment_intent', String(q.payment_intent), 'payment_intent');
      all = all.filter((r) => r.paymentIntent === String(q.payment_intent));
    }
    if (q.starting_after !== undefined) {
      const i = all.findIndex((r) => r.id === String(q.starting_after));
      if (i < 0) return missing('refund', String(q.starting_after), 'starting_after');
      all = all.slice(i + 1);
    }
    const page = all.slice(0, limit);
    return { status: 200, body: listView(page.map(refundView), '/v1/refunds', all.length > limit) };
  }

  async function readBody(req: http.IncomingMessage): Promise<string> {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    return Buffer.concat(chunks).toString('utf8');
  }

  function receipt(res: http.ServerResponse, ch: ChargeRec) {
    html(res, 200, 'Receipt', `<p class="note">Local payment stand-in: no real card was charged.</p><h1>Receipt</h1>
<p class="amt">${money(ch.amount, ch.currency)}</p><p>Card ending ${esc(ch.last4)} · ${new Date(ch.created * 1000).toISOString().slice(0, 10)}</p>
${ch.amountRefunded ? `<p>Refunded ${money(ch.amountRefunded, ch.currency)}</p>` : ''}`);
  }

  return http.createServer(async (req, res) => {
    const url = new URL(req.url ?? '/', opts.publicUrl);
    const path = url.pathname;
    const method = req.method ?? 'GET';
    try {
      if (path === '/healthz') return send(res, 200, { ok: true });
      if (path === '/_fake/events') {
        const contains = url.searchParams.get('contains');
        return send(res, 200, events.filter((e) => !contains || e.payload.includes(contains)).map((e) => ({ id: e.id, type: e.type, payload: e.payload, delivered: e.delivered, deliveries: e.deliveries })));
      }
      if (path === '/_fake/endpoint') {
        if (method === 'POST') endpointDisabled = Boolean((JSON.parse((await readBody(req)) || '{}') as { disabled?: boolean }).disabled);
        return send(res, 200, { disabled: endpointDisabled });
      }
      const receiptMatch = /^\/receipts\/(ch_test_[0-9a-f]+)$/.exec(path);
      if (receiptMatch && method === 'GET') {
        const ch = st.charges.get(receiptMatch[1]);
        return ch && ch.status === 'succeeded' ? receipt(res, ch) : html(res, 404, 'Not found', '<h1>No such receipt.</h1>');
      }
      const hosted = /^\/checkout\/(cs_test_[0-9a-f]+)(?:\/(pay|decline|cancel))?$/.exec(path);
      if (hosted) {
        const s = st.sessions.get(hosted[1]);
        if (!s) return html(res, 404, 'Not found', '<h1>This payment page does not exist.</h1>');
        const action = hosted[2];
        if (s.status === 'expired') return html(res, 410, 'Expired', `<h1>This payment page has expired.</h1><p><a href="${esc(s.cancelUrl)}">Back to the invoice</a></p>`);
        if (!action && method === 'GET') {
          if (s.status === 'complete') return html(res, 200, 'Paid', `<h1>This payment is complete.</h1><p><a href="${esc(s.successUrl.replace('{CHECKOUT_SESSION_ID}', s.id))}">Back to the invoice</a></p>`);
          return payPage(res, s);
        }
        if (method !== 'POST' || !action) return html(res, 405, 'Not allowed', '<h1>Not allowed</h1>');
        const form = new URLSearchParams(await readBody(req));
        if (action === 'cancel') {
          res.writeHead(303, { location: s.cancelUrl });
          return res.end();
        }
        if (s.status !== 'open') return payPage(res, s, 'This payment is already complete.');
        const card = (form.get('card') ?? '4242424242424242').replace(/\D/g, '');
        if (action === 'decline' || TEST_CARDS[card]?.behaviour === 'declined') {
          await decline(s, action === 'decline' ? undefined : card);
          return payPage(res, s, 'Your card was declined. Try another card.');
        }
        await pay(s, card);
        res.writeHead(303, { location: s.successUrl.replace('{CHECKOUT_SESSION_ID}', s.id) });
        return res.end();
      }

      const requestId = newId('req');
      const fail = (a: Answer) => send(res, a.status, a.body, { 'request-id': requestId });
      if (!path.startsWith('/v1/')) return fail(invalid(`Unrecognized request URL (${method}: ${path}).`));
      const auth = req.headers.authorization ?? '';
      if (!/^Bearer sk_(test|live)_\w+/.test(auth)) return send(res, 401, { error: { type: 'invalid_request_error', message: 'Invalid API Key provided.' } });
      const version = req.headers['stripe-version'];
      if (typeof version === 'string' && version !== STAND_IN_API_VERSION) return fail(invalid(`This local stand-in answers API version ${STAND_IN_API_VERSION} only, not ${version}.`));
      const raw = method === 'POST' ? await readBody(req) : url.search.slice(1);
      const key = req.headers['idempotency-key'];
      const cacheKey = typeof key === 'string' && method === 'POST' ? `${auth}:${key}` : null;
      const request = `${method} ${path} ${canonical(parseForm(raw))}`;
      if (cacheKey && inFlight.has(cacheKey)) {
        return send(res, 409, { error: { type: 'idempotency_error', message: `There is currently another in-progress request using this Idempotent Key (that probably means you submitted twice, and the other request is still going through): ${key}. Please try again later.` } });
      }
      if (cacheKey && idempotent.has(cacheKey)) {
        const hit = idempotent.get(cacheKey)!;
        if (hit.request !== request) {
          return send(res, 400, { error: { type: 'idempotency_error', message: `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${key}' if you meant to execute a different request.` } });
        }
        return send(res, hit.status, hit.body, { 'idempotent-replayed': 'true', 'original-request': requestId });
      }
      const answer = async (): Promise<Answer> => {
        const params = parseForm(raw);
        const withExpand = (obj: Obj): Answer => ({ status: 200, body: expand(obj, expandList(params), st) });
        let m: RegExpExecArray | null;
        if (path === '/v1/checkout/sessions' && method === 'POST') {
          if (!Array.isArray(params.line_items) || !params.success_url) return invalid('Missing required param: line_items or success_url.');
          return withExpand(sessionView(createSession(params), st));
        }
        if ((m = /^\/v1\/checkout\/sessions\/(\w+)$/.exec(path)) && method === 'GET') {
          const s = st.sessions.get(m[1]);
          return s ? withExpand(sessionView(s, st)) : missing('checkout.session', m[1]);
        }
        if ((m = /^\/v1\/checkout\/sessions\/(\w+)\/expire$/.exec(path)) && method === 'POST') {
          const s = st.sessions.get(m[1]);
          if (!s) return missing('checkout.session', m[1]);
          if (s.status !== 'open') return invalid(`Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of "${s.status}".`);
          s.status = 'expired';
          const view = sessionView(s, st);
          return { ...withExpand(view), after: () => void emit('checkout.session.expired', sessionView(s, st), { id: requestId, key: typeof key === 'string' ? key : null }) };
        }
        if ((m = /^\/v1\/payment_intents\/(\w+)$/.exec(path)) && method === 'GET') {
          const pi = st.intents.get(m[1]);
          return pi ? withExpand(intentView(pi)) : missing('payment_intent', m[1]);
        }
        if (path === '/v1/refunds' && method === 'POST') {
          const out = refund(params, { id: requestId, key: typeof key === 'string' ? key : null });
          return out.status === 200 ? { ...withExpand(out.body as Obj), after: out.after } : out;
        }
        if (path === '/v1/refunds' && method === 'GET') {
          const out = listRefunds(params);
          return out.status === 200 ? withExpand(out.body as Obj) : out;
        }
        return invalid(`Unrecognized request URL (${method}: ${path}).`);
      };
      if (cacheKey) inFlight.add(cacheKey);
      let out: Answer;
      try {
        out = await answer();
      } catch (err) {
        if (!(err instanceof ExpandError)) throw err;
        out = invalid(err.message, { param: 'expand' });
      } finally {
        if (cacheKey) inFlight.delete(cacheKey);
      }
      const body = JSON.stringify(out.body);
      if (cacheKey && out.status < 500) idempotent.set(cacheKey, { status: out.status, body, request });
      send(res, out.status, body, { 'request-id': requestId });
      out.after?.();
    } catch (err) {
      return send(res, 500, { error: { type: 'api_error', message: err instanceof Error ? err.message : String(err) } });
    }
  });
}
