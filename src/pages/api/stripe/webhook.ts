import type { APIRoute } from 'astro';
import { handleError, json } from '../../../server/http.ts';
import { AppError } from '../../../lib/errors.ts';
import { handleStripeWebhook } from '../../../server/services/stripe-webhook.ts';

const MAX_BYTES = 512 * 1024;

/** Stripe's signed events. The raw bytes are verified before anything is parsed. */
export const POST: APIRoute = async ({ request }) => {
  try {
    if (Number(request.headers.get('content-length') ?? 0) > MAX_BYTES) throw new AppError('PAYLOAD_TOO_LARGE', 'Event too large.');
    const raw = Buffer.from(await request.arrayBuffer());
    if (raw.length > MAX_BYTES) throw new AppError('PAYLOAD_TOO_LARGE', 'Event too large.');
    const r = await handleStripeWebhook(raw, request.headers.get('stripe-signature'));
    return json(r.body, r.status);
  } catch (err) {
    return handleError(err);
  }
};
