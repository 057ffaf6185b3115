import http from 'node:http';
import { randomBytes } from 'node:crypto';
import Stripe from 'stripe';

export interface StripeFakeOptions {
  webhookUrl: string;
  webhookSecret: string;
  publicUrl: string;
}

type Obj = Record<string, unknown>;

/** Stripe's form encoding (a[b][0][c]=v) back into nested objects and arrays. */
export function parseForm(body: string): Obj {
  const out: Obj = {};
  for (const [rawKey, value] of new URLSearchParams(body)) {
    const keys = rawKey.replace(/\]/g, '').split('[');
    let node: Obj | unknown[] = out;
    keys.forEach((k, i) => {
      const last = i === keys.length - 1;
      const nextIsIndex = !last && /^\d+$/.test(keys[i + 1]);
      const slot = node as Record<string, unknown>;
      if (last) slot[k] = value;
      else {
        slot[k] ??= nextIsIndex ? [] : {};
        node = slot[k] as Obj;
      }
    });
  }
  return out;
}

const id = (prefix: string) => `${prefix}_test_${randomBytes(12).toString('hex')}`;
const now = () => Math.floor(Date.now() / 1000);

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

/**
 * A local stand-in for the parts of the Stripe API that Tallypost calls (Checkout Sessions
 * created, read and expired; PaymentIntents; refunds; idempotency keys kept as Stripe keeps
 * them), with a hosted pay page that can pay, fail a card or cancel, and signed webhooks
 * (stripe.webhooks.generateTestHeaderString) posted back to the app.
 */
export function createStripeFake(opts: StripeFakeOptions): http.Server {
  const sessions = new Map<string, Obj>();
  const intents = new Map<string, Obj>();
  const charges = new Map<string, Obj>();
  /** Stripe keeps a key's first answer for 24 h and refuses the key with other parameters. */
  const idempotent = new Map<string, { status: number; body: string; request: string }>();
  const events: { id: string; type: string; payload: string; deliveries: { status: number; at: number }[] }[] = [];
  const signer = new Stripe('sk_test_signer');

  async function deliver(ev: (typeof events)[number]): Promise<number> {
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

  /** Sends an event now and, like Stripe, again later while the app does not answer 2xx. */
  async function emit(type: string, object: Obj): Promise<void> {
    const event = { id: id('evt'), object: 'event', api_version: '2025-01-27.acacia', created: now(), livemode: false, pending_webhooks: 1, type, data: { object } };
    const ev = { id: event.id, type, payload: JSON.stringify(event, null, 2), deliveries: [] as { status: number; at: number }[] };
    events.push(ev);
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

  function apiError(res: http.ServerResponse, status: number, message: string, extra: Obj = {}) {
    send(res, status, { error: { type: status === 401 ? 'invalid_request_error' : 'invalid_request_error', message, ...extra } });
  }

  function send(res: http.ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}) {
    res.writeHead(status, { 'content-type': 'application/json', 'request-id': id('req'), ...headers });
    res.end(typeof body === 'string' ? body : JSON.stringify(body));
  }

  function html(res: http.ServerResponse, status: number, title: string, body: string) {
    res.writeHead(status, { 'content-type': 'text/html; charset=utf-8' });
    res.end(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${esc(title)}</title>
<style>body{margin:0;font-family:system-ui,sans-serif;background:#eef1f5;color:#1a1f36}main{max-width:26rem;margin:2rem auto;background:#fff;border-radius:10px;box-shadow:0 2px 12px #0002;padding:1.5rem}
.note{font-size:.75rem;background:#fff7d6;border:1px solid #e8d48a;border-radius:6px;padding:.4rem .6rem;margin-bottom:1rem}h1{font-size:1.1rem;margin:.2rem 0}.amt{font-size:2rem;font-weight:700;margin:.4rem 0 1rem}
label{display:block;font-size:.8rem;color:#555;margin:.6rem 0 .2rem}input{width:100%;box-sizing:border-box;padding:.55rem;border:1px solid #cfd5de;border-radius:6px;font-size:1rem}
button{width:100%;padding:.75rem;border:0;border-radius:6px;font-size:1rem;margin-top:.7rem;cursor:pointer}.pay{background:#3d5afe;color:#fff}.fail{background:#fff;border:1px solid #c62828;color:#c62828}.cancel{background:#fff;border:1px solid #aab;color:#333}
.err{background:#fdecea;color:#8a1c12;border-radius:6px;padding:.5rem .7rem}</style></head><body><main>${body}</main></body></html>`);
  }

  function payPage(res: http.ServerResponse, s: Obj, message?: string) {
    const item = ((s.line_items as Obj[] | undefined) ?? [])[0] ?? {};
    const pd = (item.price_data ?? {}) as Obj;
    const product = (pd.product_data ?? {}) as Obj;
    const amount = Number(s.amount_total);
    html(res, 200, 'Pay', `<p class="note">Local payment stand-in: no real card is charged.</p>
<p style="color:#666;margin:0">${esc(product.name)}</p><h1>${esc(product.description)}</h1><p class="amt" data-testid="amount">${money(amount, String(s.currency))}</p>
${message ? `<p class="err" role="alert">${esc(message)}</p>` : ''}
<form method="post" action="/checkout/${esc(s.id)}/pay"><label>E-mail</label><input name="email" value="${esc(s.customer_email)}" readonly>
<label>Card number</label><input name="card" value="4242 4242 4242 4242" readonly><button class="pay" type="submit">Pay ${money(amount, String(s.currency))}</button></form>
<form method="post" action="/checkout/${esc(s.id)}/decline"><button class="fail" type="submit">Try a card that is declined</button></form>
<form method="post" action="/checkout/${esc(s.id)}/cancel"><button class="cancel" type="submit">Cancel and go back</button></form>`);
  }

  function createSession(p: Obj): Obj {
    const items = (p.line_items as Obj[] | undefined) ?? [];
    const amount = items.reduce((a, it) => a + Number((it.price_data as Obj)?.unit_amount ?? 0) * Number(it.quantity ?? 1), 0);
    const currency = String((items[0]?.price_data as Obj)?.currency ?? 'usd');
    const sid = id('cs');
    const s: Obj = {
      id: sid, object: 'checkout.session', mode: p.mode ?? 'payment', status: 'open', payment_status: 'unpaid', amount_total: amount, amount_subtotal: amount, currency,
      customer_email: p.customer_email ?? null, client_reference_id: p.client_reference_id ?? null, metadata: p.metadata ?? {},
      payment_intent: null, success_url: p.success_url, cancel_url: p.cancel_url, url: `${opts.publicUrl}/checkout/${sid}`, created: now(),
      expires_at: now() + 24 * 3600, livemode: false, line_items: items, payment_intent_data: p.payment_intent_data ?? {},
    };
    sessions.set(sid, s);
    return s;
  }

  function publicSession(s: Obj): Obj {
    const { line_items: _l, payment_intent_data: _p, ...rest } = s;
    return rest;
  }

  async function pay(s: Obj): Promise<void> {
    const pid = id('pi');
    const chid = id('ch');
    const meta = ((s.payment_intent_data as Obj)?.metadata ?? {}) as Obj;
    const pi: Obj = { id: pid, object: 'payment_intent', amount: s.amount_total, amount_received: s.amount_total, currency: s.currency, status: 'succeeded', metadata: meta, latest_charge: chid, created: now(), livemode: false };
    intents.set(pid, pi);
    charges.set(chid, { id: chid, object: 'charge', amount: s.amount_total, amount_refunded: 0, currency: s.currency, payment_intent: pid, refunded: false, refunds: { object: 'list', data: [] }, metadata: meta, paid: true, status: 'succeeded' });
    Object.assign(s, { status: 'complete', payment_status: 'paid', payment_intent: pid });
    await emit('checkout.session.completed', publicSession(s));
    await emit('payment_intent.succeeded', pi);
  }

  async function decline(s: Obj): Promise<void> {
    const pid = (s.declined_intent as string) ?? id('pi');
    s.declined_intent = pid;
    const meta = ((s.payment_intent_data as Obj)?.metadata ?? {}) as Obj;
    const pi: Obj = {
      id: pid, object: 'payment_intent', amount: s.amount_total, amount_received: 0, currency: s.currency, status: 'requires_payment_method', metadata: meta, created: now(), livemode: false,
      last_payment_error: { type: 'card_error', code: 'card_declined', decline_code: 'generic_decline', message: 'Your card was declined.' },
    };
    intents.set(pid, pi);
    await emit('payment_intent.payment_failed', pi);
  }

  async function refund(p: Obj): Promise<{ status: number; body: Obj }> {
    const pi = intents.get(String(p.payment_intent ?? ''));
    if (!pi || pi.status !== 'succeeded') return { status: 400, body: { error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such payment_intent: '${p.payment_intent}'` } } };
    const ch = charges.get(String(pi.latest_charge))!;
    const amount = p.amount === undefined ? Number(ch.amount) - Number(ch.amount_refunded) : Number(p.amount);
    if (!Number.isInteger(amount) || amount <= 0) return { status: 400, body: { error: { type: 'invalid_request_error', code: 'parameter_invalid_integer', param: 'amount', message: 'Invalid integer: amount' } } };
    if (amount > Number(ch.amount) - Number(ch.amount_refunded)) {
      return { status: 400, body: { error: { type: 'invalid_request_error', code: 'charge_already_refunded', message: `Refund amount (${money(amount, String(ch.currency))}) is greater than unrefunded amount on charge.` } } };
    }
    const re: Obj = { id: id('re'), object: 'refund', amount, currency: ch.currency, charge: ch.id, payment_intent: pi.id, status: 'succeeded', metadata: p.metadata ?? {}, created: now() };
    ch.amount_refunded = Number(ch.amount_refunded) + amount;
    ch.refunded = ch.amount_refunded === ch.amount;
    (ch.refunds as { data: Obj[] }).data.unshift(re);
    void emit('charge.refunded', { ...ch });
    return { status: 200, body: re };
  }

  async function readBody(req: http.IncomingMessage): Promise<string> {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    return Buffer.concat(chunks).toString('utf8');
  }

  return http.createServer(async (req, res) => {
    const url = new URL(req.url ?? '/', opts.publicUrl);
    const path = url.pathname;
    const method = req.method ?? 'GET';
    try {
      if (path === '/healthz') return send(res, 200, { ok: true });
      if (path === '/_fake/events') return send(res, 200, events.map((e) => ({ id: e.id, type: e.type, payload: e.payload, deliveries: e.deliveries })));
      const hosted = /^\/checkout\/(cs_test_[0-9a-f]+)(?:\/(pay|decline|cancel))?$/.exec(path);
      if (hosted) {
        const s = sessions.get(hosted[1]);
        if (!s) return html(res, 404, 'Not found', '<h1>This payment page does not exist.</h1>');
        const action = hosted[2];
        if (s.status === 'expired') return html(res, 410, 'Expired', `<h1>This payment page has expired.</h1><p><a href="${esc(s.cancel_url)}">Back to the invoice</a></p>`);
        if (!action && method === 'GET') {
          if (s.status === 'complete') return html(res, 200, 'Paid', `<h1>This payment is complete.</h1><p><a href="${esc(String(s.success_url).replace('{CHECKOUT_SESSION_ID}', String(s.id)))}">Back to the invoice</a></p>`);
          return payPage(res, s);
        }
        if (method !== 'POST' || !action) return html(res, 405, 'Not allowed', '<h1>Not allowed</h1>');
        await readBody(req);
        if (action === 'cancel') {
          res.writeHead(303, { location: String(s.cancel_url) });
          return res.end();
        }
        if (s.status !== 'open') return payPage(res, s, 'This payment is already complete.');
        if (action === 'decline') {
          await decline(s);
          return payPage(res, s, 'Your card was declined. Try another card.');
        }
        await pay(s);
        res.writeHead(303, { location: String(s.success_url).replace('{CHECKOUT_SESSION_ID}', String(s.id)) });
        return res.end();
      }

      if (!path.startsWith('/v1/')) return apiError(res, 404, `Unrecognized request URL (${method}: ${path}).`);
      const auth = req.headers.authorization ?? '';
      if (!/^Bearer sk_(test|live)_\w+/.test(auth)) return apiError(res, 401, 'Invalid API Key provided.');
      const raw = method === 'POST' ? await readBody(req) : '';
      const key = req.headers['idempotency-key'];
      const cacheKey = typeof key === 'string' && method === 'POST' ? `${auth}:${key}` : null;
      const request = `${method} ${path} ${canonical(parseForm(raw))}`;
      if (cacheKey && idempotent.has(cacheKey)) {
        const hit = idempotent.get(cacheKey)!;
        if (hit.request !== request) {
          return send(res, 400, { error: { type: 'idempotency_error', message: `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${key}' if you meant to execute a different request.` } });
        }
        return send(res, hit.status, hit.body, { 'idempotent-replayed': 'true' });
      }
      const answer = async (): Promise<{ status: number; body: unknown }> => {
        const params = parseForm(raw);
        let m: RegExpExecArray | null;
        if (path === '/v1/checkout/sessions' && method === 'POST') {
          if (!Array.isArray(params.line_items) || !params.success_url) return { status: 400, body: { error: { type: 'invalid_request_error', message: 'Missing required param: line_items or success_url.' } } };
          return { status: 200, body: publicSession(createSession(params)) };
        }
        if ((m = /^\/v1\/checkout\/sessions\/([\w]+)$/.exec(path)) && method === 'GET') {
          const s = sessions.get(m[1]);
          return s ? { status: 200, body: publicSession(s) } : { status: 404, body: { error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such checkout.session: '${m[1]}'` } } };
        }
        if ((m = /^\/v1\/checkout\/sessions\/([\w]+)\/expire$/.exec(path)) && method === 'POST') {
          const s = sessions.get(m[1]);
          if (!s) return { status: 404, body: { error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such checkout.session: '${m[1]}'` } } };
          if (s.status !== 'open') return { status: 400, body: { error: { type: 'invalid_request_error', message: `Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of "${s.status}".` } } };
          Object.assign(s, { status: 'expired', url: null });
          return { status: 200, body: publicSession(s) };
        }
        if ((m = /^\/v1\/payment_intents\/([\w]+)$/.exec(path)) && method === 'GET') {
          const pi = intents.get(m[1]);
          return pi ? { status: 200, body: pi } : { status: 404, body: { error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such payment_intent: '${m[1]}'` } } };
        }
        if (path === '/v1/refunds' && method === 'POST') return refund(params);
        return { status: 404, body: { error: { type: 'invalid_request_error', message: `Unrecognized request URL (${method}: ${path}).` } } };
      };
      const out = await answer();
      const body = JSON.stringify(out.body);
      if (cacheKey && out.status < 500) idempotent.set(cacheKey, { status: out.status, body, request });
      return send(res, out.status, body);
    } catch (err) {
      return apiError(res, 500, err instanceof Error ? err.message : String(err));
    }
  });
}
