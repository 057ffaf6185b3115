import Stripe from 'stripe';
import { env } from '../env.ts';

let client: Stripe | undefined;

/**
 * The Stripe API version every request and webhook uses. Pinned, so a Stripe upgrade never
 * changes a shape under us; stripe-node's types describe this version (an SDK upgrade that
 * moves it fails the type check here), and tests/api/stripe-contract.test.ts holds the local
 * stand-in to it. Set the webhook endpoint at Stripe to the same version.
 */
export const STRIPE_API_VERSION = '2026-10-28.endive' as const;

/**
 * The event types the webhook endpoint at Stripe subscribes to: what
 * services/stripe-webhook.ts acts on. Configure the endpoint with exactly these.
 */
export const WEBHOOK_EVENTS = [
  'checkout.session.completed',
  'checkout.session.async_payment_succeeded',
  'payment_intent.succeeded',
  'payment_intent.payment_failed',
  'charge.refunded',
  'refund.created',
  'refund.updated',
  'refund.failed',
] as const;

/**
 * The Stripe SDK. With STRIPE_API_BASE set (the local stack and the tests) it talks to the
 * stand-in in src/fakes/stripe over the same code path it uses against Stripe.
 */
export function stripe(): Stripe {
  if (!client) {
    const e = env();
    const base = e.STRIPE_API_BASE ? new URL(e.STRIPE_API_BASE) : null;
    client = new Stripe(e.STRIPE_SECRET_KEY, {
      apiVersion: STRIPE_API_VERSION,
      ...(base ? { host: base.hostname, port: Number(base.port || (base.protocol === 'https:' ? 443 : 80)), protocol: base.protocol.replace(':', '') as 'http' | 'https' } : {}),
      maxNetworkRetries: 2,
      timeout: 20_000,
      telemetry: false,
    });
  }
  return client;
}

/** Largest clock difference accepted on a signed webhook, either way (Stripe's own default is 300 s, past only). */
export const WEBHOOK_TOLERANCE_SECONDS = 300;

export type VerifyResult = { ok: true; event: Stripe.Event } | { ok: false; reason: string };

/**
 * Checks a webhook with the SDK against the raw body, then refuses a timestamp more than the
 * tolerance in the future, which the SDK lets through.
 */
export function verifyWebhook(raw: Buffer, header: string | null, nowSeconds = Math.floor(Date.now() / 1000)): VerifyResult {
  if (!header) return { ok: false, reason: 'No Stripe-Signature header.' };
  let event: Stripe.Event;
  try {
    event = stripe().webhooks.constructEvent(raw, header, env().STRIPE_WEBHOOK_SECRET, WEBHOOK_TOLERANCE_SECONDS);
  } catch (err) {
    return { ok: false, reason: err instanceof Error ? err.message : 'The signature does not match.' };
  }
  const t = Number(/(?:^|,)t=(\d+)/.exec(header)?.[1]);
  if (!Number.isFinite(t) || t - nowSeconds > WEBHOOK_TOLERANCE_SECONDS) return { ok: false, reason: 'The signature timestamp is in the future.' };
  return { ok: true, event };
}
