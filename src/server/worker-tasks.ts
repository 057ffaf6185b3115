// Each feature that makes attachments or needs periodic work registers it here, so the
// worker process loads it. (Imports only; see registerAttachment / registerPeriodic.)
import { registerAttachment, registerPeriodic } from './outbox/worker.ts';
import { env } from './env.ts';
import { invoicePdf } from './services/invoice-pdf.ts';
import { sendDueReminders } from './services/reminders.ts';
import { expireStaleCheckoutSessions } from './services/checkout-sessions.ts';

registerAttachment('invoice-pdf', async (ref, organizationId) => {
  if (!organizationId) throw new Error('invoice PDF without a company');
  return (await invoicePdf(organizationId, Number(ref.invoiceId))).pdf;
});

/** Reminders are looked at every few seconds at most (REMINDER_EVERY_MS); sending is once per invoice and day anyway. */
let last = 0;
registerPeriodic(async () => {
  if (Date.now() - last < env().REMINDER_EVERY_MS) return;
  last = Date.now();
  await sendDueReminders();
});

/** Hosted card pages that outlived their invoice's balance and could not be expired at the time. */
let lastExpiry = 0;
registerPeriodic(async () => {
  if (Date.now() - lastExpiry < 60_000) return;
  lastExpiry = Date.now();
  await expireStaleCheckoutSessions({ limit: 50 });
});
