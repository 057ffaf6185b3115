/**
 * Entry of the local Stripe stand-in. Reads its port, the webhook URL and the signing
 * secret from the environment; see server.ts for what it answers. It sends the app the
 * event types the app's endpoint subscribes to at Stripe (WEBHOOK_EVENTS), as Stripe would.
 */
import { createStripeFake } from './server.ts';
import { WEBHOOK_EVENTS } from '../../server/payments/stripe.ts';

const port = Number(process.env.STRIPE_FAKE_PORT ?? 12111);
const fake = createStripeFake({
  webhookUrl: process.env.STRIPE_WEBHOOK_URL ?? 'http://127.0.0.1:4321/api/stripe/webhook',
  webhookSecret: process.env.STRIPE_WEBHOOK_SECRET ?? 'whsec_local_development_secret',
  publicUrl: `http://127.0.0.1:${port}`,
  enabledEvents: WEBHOOK_EVENTS,
});
fake.listen(port, '127.0.0.1', () => console.log(`stripe stand-in on http://127.0.0.1:${port}`));
for (const sig of ['SIGINT', 'SIGTERM'] as const) process.on(sig, () => fake.close(() => process.exit(0)));
