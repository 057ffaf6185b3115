/**
 * The outbox worker: sends queued e-mail and runs periodic jobs (reminders). Runs beside
 * the app; several may run at once (rows are claimed with SKIP LOCKED).
 */
import '../server/worker-tasks.ts';
import { runWorker } from '../server/outbox/worker.ts';
import { closeDb } from '../server/db.ts';
import { closeMailer } from '../server/mail/mailer.ts';

const controller = new AbortController();
for (const sig of ['SIGINT', 'SIGTERM'] as const) {
  process.on(sig, () => controller.abort());
}
await runWorker({ intervalMs: Number(process.env.WORKER_INTERVAL_MS ?? 300), signal: controller.signal });
closeMailer();
await closeDb();
