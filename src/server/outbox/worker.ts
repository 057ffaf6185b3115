import os from 'node:os';
import type { Knex } from 'knex';
import { db } from '../db.ts';
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
const LOCK_SECONDS = Number(process.env.OUTBOX_LOCK_SECONDS ?? 120);
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

/** Claims one due mail with SKIP LOCKED, so several workers never take the same row. */
async function claim(k: Knex): Promise<OutboxRow | undefined> {
  return k.transaction(async (trx) => {
    const row = await trx('outbox')
      .where('status', 'pending')
      .andWhere('next_attempt_at', '<=', trx.fn.now(3))
      .orderBy('id')
      .first()
      .forUpdate()
      .skipLocked();
    if (!row) return undefined;
    await trx('outbox')
      .where('id', row.id)
      .update({
        status: 'sending',
        attempts: row.attempts + 1,
        locked_by: workerId,
        locked_until: trx.raw('DATE_ADD(NOW(3), INTERVAL ? SECOND)', [LOCK_SECONDS]),
      });
    return row as OutboxRow;
  });
}

/** A mail left 'sending' by a worker that died goes back to pending after its lock. */
async function releaseStale(k: Knex): Promise<void> {
  await k('outbox')
    .where('status', 'sending')
    .andWhere('locked_until', '<', k.fn.now(3))
    .update({ status: 'pending', locked_by: null });
}

async function sendOne(k: Knex, row: OutboxRow): Promise<void> {
  // Fault injection for the crash tests: die between claiming a mail and sending it.
  if (process.env.TALLYPOST_FAULT === 'outbox-after-claim') process.exit(137);
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
      from: process.env.MAIL_FROM ?? 'Tallypost <no-reply@tallypost.test>',
      to: row.to_address,
      subject: row.subject,
      text: row.body_text,
      html: row.body_html,
      messageId,
      attachments,
    });
    await k('outbox').where({ id: row.id, status: 'sending' }).update({
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
    await k('outbox')
      .where('id', row.id)
      .update({
        status: failed ? 'failed' : 'pending',
        last_error: message.slice(0, 1000),
        locked_by: null,
        // back off: 5 s, 10 s, 20 s, ... up to 10 min
        next_attempt_at: k.raw('DATE_ADD(NOW(3), INTERVAL ? SECOND)', [Math.min(600, 5 * 2 ** row.attempts)]),
      });
  }
}

/** Sends every due mail once; returns how many it tried. */
export async function drainOutbox(k: Knex = db()): Promise<number> {
  await releaseStale(k);
  let n = 0;
  for (;;) {
    const row = await claim(k);
    if (!row) return n;
    await sendOne(k, row);
    n++;
  }
}

/** The worker loop: survives database restarts, stops on SIGINT/SIGTERM. */
export async function runWorker(opts: { intervalMs?: number; signal?: AbortSignal } = {}): Promise<void> {
  const interval = opts.intervalMs ?? 500;
  while (!opts.signal?.aborted) {
    try {
      for (const job of periodic) await job();
      await drainOutbox();
    } catch (err) {
      console.error('[worker]', err instanceof Error ? err.message : err);
    }
    await new Promise((r) => setTimeout(r, interval));
  }
}
