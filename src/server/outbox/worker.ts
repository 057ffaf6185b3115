import os from 'node:os';
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { env } from '../env.ts';
import { mailer } from '../mail/mailer.ts';
import type { AttachmentRef } from '../mail/outbox.ts';

type Resolver = (ref: Record<string, unknown>, organizationId: string | null) => Promise<Buffer>;
const resolvers = new Map<string, Resolver>();

/** Features register how to build their attachments (an invoice PDF, say) at send time. */
export function registerAttachment(kind: string, resolver: Resolver): void {
  resolvers.set(kind, resolver);
}

type Job = () => Promise<void>;
const periodic: Job[] = [];
/** Other periodic work the worker runs each tick (reminders, for one). */
export function registerPeriodic(job: Job): void {
  periodic.push(job);
}

/** How long a claimed mail stays with its worker before another may retry it. */
const lockSeconds = () => env().OUTBOX_LOCK_SECONDS;
const MAX_ATTEMPTS = 8;
const workerId = `${os.hostname()}:${process.pid}`;

interface OutboxRow {
  id: number;
  organization_id: string | null;
  to_address: string;
  subject: string;
  body_text: string;
  body_html: string;
  attachments: string;
  attempts: number;
}

/** How many mails one worker claims at a time; they go out over a small SMTP pool. */
const batch = () => env().OUTBOX_BATCH;

/** Claims up to `limit` due mails with SKIP LOCKED, so several workers never take the same row. */
async function claim(k: Knex, limit: number): Promise<OutboxRow[]> {
  return k.transaction(async (trx) => {
    const rows = (await trx('outbox')
      .where('status', 'pending')
      .andWhere('next_attempt_at', '<=', trx.fn.now(3))
      .orderBy('id')
      .limit(limit)
      .forUpdate()
      .skipLocked()) as OutboxRow[];
    if (!rows.length) return [];
    await trx('outbox')
      .whereIn('id', rows.map((r) => r.id))
      .update({
        status: 'sending',
        attempts: trx.raw('attempts + 1'),
        locked_by: workerId,
        locked_until: trx.raw('DATE_ADD(NOW(3), INTERVAL ? SECOND)', [lockSeconds()]),
      });
    return rows;
  });
}

/** A mail left 'sending' by a worker that died goes back to pending after its lock. */
async function releaseStale(k: Knex): Promise<void> {
  await k('outbox')
    .where('status', 'sending')
    .andWhere('locked_until', '<', k.fn.now(3))
    .update({ status: 'pending', locked_by: null });
}

/** This worker's claim on a row: only while it still holds it may it send or settle it. */
const mine = (k: Knex, id: number) => k('outbox').where({ id, status: 'sending', locked_by: workerId });

async function sendOne(k: Knex, row: OutboxRow): Promise<void> {
  // Fault injection for the crash tests: die between claiming a mail and sending it.
  if (env().TALLYPOST_FAULT === 'outbox-after-claim') process.exit(137);
  // A batch may wait behind a slow mail server: renew the lock just before this send (the
  // send is bounded by the transport's timeouts, well inside it). A row whose lock ran out
  // and went to another worker is left to that worker, so no mail goes out twice.
  const held = await mine(k, row.id).update({ locked_until: k.raw('DATE_ADD(NOW(3), INTERVAL ? SECOND)', [lockSeconds()]) });
  if (!held) return;
  try {
    const refs = JSON.parse(row.attachments || '[]') as AttachmentRef[];
    const attachments = [];
    for (const a of refs) {
      const resolve = resolvers.get(a.kind);
      if (!resolve) throw new Error(`no attachment resolver for ${a.kind}`);
      attachments.push({ filename: a.filename, content: await resolve(a.ref, row.organization_id) });
    }
    // A stable Message-ID: if a crash lands between the SMTP server's 250 and our update,
    // the retry carries the same id and receivers can drop it as a duplicate.
    const messageId = `<outbox-${row.id}@tallypost.local>`;
    const info = await mailer().sendMail({
      from: env().MAIL_FROM,
      to: row.to_address,
      subject: row.subject,
      text: row.body_text,
      html: row.body_html,
      messageId,
      attachments,
    });
    await mine(k, row.id).update({
      status: 'sent',
      sent_at: k.fn.now(3),
      message_id: info.messageId ?? messageId,
      smtp_response: String(info.response ?? '').slice(0, 250),
      locked_by: null,
      last_error: null,
    });
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const failed = row.attempts + 1 >= MAX_ATTEMPTS;
    await mine(k, row.id)
      .update({
        status: failed ? 'failed' : 'pending',
        last_error: message.slice(0, 1000),
        locked_by: null,
        // back off: 5 s, 10 s, 20 s, ... up to 10 min
        next_attempt_at: k.raw('DATE_ADD(NOW(3), INTERVAL ? SECOND)', [Math.min(600, 5 * 2 ** row.attempts)]),
      });
  }
}

/**
 * Sends every due mail once; returns how many it tried. Each claimed batch goes out in
 * parallel across recipients, but one recipient's mails stay in the order they were queued
 * (an invoice before its receipt).
 */
export async function drainOutbox(k: Knex = db()): Promise<number> {
  await releaseStale(k);
  let n = 0;
  for (;;) {
    const rows = await claim(k, batch());
    if (!rows.length) return n;
    const byRecipient = new Map<string, OutboxRow[]>();
    for (const row of rows) {
      const key = row.to_address.toLowerCase();
      byRecipient.set(key, [...(byRecipient.get(key) ?? []), row]);
    }
    await Promise.all([...byRecipient.values()].map(async (queue) => {
      for (const row of queue) await sendOne(k, row);
    }));
    n += rows.length;
  }
}

/** The worker loop: survives database restarts, stops on SIGINT/SIGTERM. */
export async function runWorker(opts: { intervalMs?: number; signal?: AbortSignal } = {}): Promise<void> {
  const interval = opts.intervalMs ?? 500;
  // Periodic jobs run beside the outbox, never in front of it: a slow pass (reminders for
  // every company, retrying the card processor) must not hold up the mail.
  let periodicPass: Promise<void> | null = null;
  while (!opts.signal?.aborted) {
    periodicPass ??= (async () => {
      for (const job of periodic) {
        try {
          await job();
        } catch (err) {
          console.error('[worker]', err instanceof Error ? err.message : err);
        }
      }
    })().finally(() => { periodicPass = null; });
    try {
      await drainOutbox();
    } catch (err) {
      console.error('[worker]', err instanceof Error ? err.message : err);
    }
    await new Promise((r) => setTimeout(r, interval));
  }
  await periodicPass;
}
