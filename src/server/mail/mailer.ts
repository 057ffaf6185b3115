import nodemailer, { type Transporter } from 'nodemailer';
import { env } from '../env.ts';

let transport: Transporter | undefined;

/** nodemailer over SMTP: the provider in production, the local mail sink here. */
export function mailer(): Transporter {
  if (!transport) {
    const e = env();
    const secure = e.SMTP_SECURE === 'true';
    transport = nodemailer.createTransport({
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure,
      ignoreTLS: !secure && e.SMTP_HOST === '127.0.0.1',
      auth: e.SMTP_USER ? { user: e.SMTP_USER, pass: e.SMTP_PASS ?? '' } : undefined,
      // A few reused connections, so a backlog drains quickly; a stalled server ends a
      // send within the timeouts instead of holding the worker.
      pool: true,
      maxConnections: 4,
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 30_000,
    });
  }
  return transport;
}

/** Closes the pooled SMTP connections, so a stopping worker exits at once. */
export function closeMailer(): void {
  transport?.close();
  transport = undefined;
}
