/**
 * The outbox worker: sends queued e-mail and runs periodic jobs (reminders). Runs beside
 * the app; several may run at once (rows are claimed with SKIP LOCKED).
 */
import { assertReadyToServe, env } from '../server/env.ts';

// Before anything is sent: a production worker with a development key or address would
// mail links nobody can open, or sign them with a public secret.
try {
  assertReadyToServe();
} catch (err) {
  console.error(`[worker] ${(err as Error).message}`);
  process.exit(1);
}

const { runWorker } = await import('../server/outbox/worker.ts');
await import('../server/worker-tasks.ts');
const { closeDb } = await import('../server/db.ts');
const { closeMailer } = await import('../server/mail/mailer.ts');

const controller = new AbortController();
for (const sig of ['SIGINT', 'SIGTERM'] as const) {
  process.on(sig, () => controller.abort());
}
await runWorker({ intervalMs: env().WORKER_INTERVAL_MS, signal: controller.signal });
closeMailer();
await closeDb();
