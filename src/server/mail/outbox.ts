import type { Knex } from 'knex';
import type { MailContent } from './templates.ts';

/** An attachment made when the mail is sent, by a resolver registered for its kind. */
export interface AttachmentRef {
  kind: string;
  /** e.g. { invoiceId: 12 } */
  ref: Record<string, unknown>;
  filename: string;
}

export interface OutboxMail extends MailContent {
  organizationId: string | null;
  attachments?: AttachmentRef[];
  /** A key that makes the mail happen once, e.g. 'reminder:invoice:12:due+7'. */
  dedupeKey?: string;
}

/**
 * Writes a mail to the outbox with the caller's transaction (or the plain connection), so
 * the mail exists exactly when the change that causes it commits. The worker sends it.
 * Returns false when the dedupe key was already used.
 */
export async function enqueueMail(q: Knex | Knex.Transaction, mail: OutboxMail): Promise<boolean> {
  const row = {
    organization_id: mail.organizationId,
    to_address: mail.to,
    subject: mail.subject,
    body_text: mail.text,
    body_html: mail.html,
    attachments: JSON.stringify(mail.attachments ?? []),
    dedupe_key: mail.dedupeKey ?? null,
    status: 'pending',
    attempts: 0,
    next_attempt_at: q.fn.now(3),
  };
  if (mail.dedupeKey) {
    const inserted = await q('outbox').insert(row).onConflict('dedupe_key').ignore();
    return Array.isArray(inserted) ? Number(inserted[0]) > 0 : true;
  }
  await q('outbox').insert(row);
  return true;
}
