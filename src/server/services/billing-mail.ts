import { escapeHtml } from '../../lib/text.ts';
import { formatDate, formatMoney, type CurrencyCode } from '../../lib/format.ts';
import type { MailContent } from '../mail/templates.ts';

interface InvoiceFacts {
  to: string;
  company: string;
  customerName: string;
  numberText: string;
  jobTitle: string;
  totalCents: number;
  balanceCents: number;
  dueOn: string | null;
  url: string;
  currency: CurrencyCode;
}

function page(heading: string, rows: [string, string][], paragraphs: string[], link?: { url: string; label: string }): string {
  const table = rows.map(([k, v]) => `<tr><td style="padding:4px 12px 4px 0;color:#5e717e">${escapeHtml(k)}</td><td style="padding:4px 0;font-weight:600">${escapeHtml(v)}</td></tr>`).join('');
  const cta = link
    ? `<p style="margin:20px 0"><a href="${escapeHtml(link.url)}" style="background:#7c4728;color:#fff;padding:10px 18px;border-radius:6px;text-decoration:none;display:inline-block">${escapeHtml(link.label)}</a></p><p style="font-size:12px;color:#5e717e">Or open: ${escapeHtml(link.url)}</p>`
    : '';
  return `<!doctype html><html><body style="margin:0;background:#fbf7f1;font-family:Inter,Arial,sans-serif;color:#1f262b">
<div style="max-width:560px;margin:24px auto;background:#fff;border:1px solid #e8d3b5;border-radius:8px;padding:24px">
<h1 style="font-size:18px;margin:0 0 12px;color:#3f2517">${escapeHtml(heading)}</h1>
${paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join('')}
<table style="border-collapse:collapse;font-size:14px">${table}</table>${cta}
</div></body></html>`;
}

function text(heading: string, rows: [string, string][], paragraphs: string[], url?: string): string {
  return [heading, '', ...paragraphs, '', ...rows.map(([k, v]) => `${k}: ${v}`), ...(url ? ['', `View and pay online: ${url}`] : [])].join('\n');
}

export function invoiceMail(f: InvoiceFacts): MailContent {
  const subject = `Invoice ${f.numberText} from ${f.company}`;
  const rows: [string, string][] = [['Invoice', f.numberText], ['Job', f.jobTitle], ['Amount', formatMoney(f.totalCents, f.currency)], ['Balance due', formatMoney(f.balanceCents, f.currency)], ['Due', f.dueOn ? formatDate(f.dueOn) : 'On receipt']];
  const paras = [`Hello ${f.customerName},`, `${f.company} has sent you invoice ${f.numberText}. The PDF is attached; you can also view it and pay online by card.`];
  return { to: f.to, subject, text: text(subject, rows, paras, f.url), html: page(subject, rows, paras, { url: f.url, label: 'View and pay the invoice' }) };
}

export function receiptMail(f: InvoiceFacts & { paidCents: number; method: string; receivedOn: string }): MailContent {
  const subject = `Payment received for invoice ${f.numberText} — thank you`;
  const rows: [string, string][] = [['Invoice', f.numberText], ['Job', f.jobTitle], ['Payment', formatMoney(f.paidCents, f.currency)], ['Paid by', f.method], ['Received', formatDate(f.receivedOn)], ['Balance left', formatMoney(f.balanceCents, f.currency)]];
  const paras = [`Hello ${f.customerName},`, `${f.company} has received your payment. This e-mail is your receipt.`];
  return { to: f.to, subject, text: text(subject, rows, paras, f.url), html: page(subject, rows, paras, { url: f.url, label: 'See the invoice' }) };
}

export function reminderMail(f: InvoiceFacts & { when: string }): MailContent {
  const subject = `Reminder: invoice ${f.numberText} from ${f.company} ${f.when}`;
  const rows: [string, string][] = [['Invoice', f.numberText], ['Job', f.jobTitle], ['Balance due', formatMoney(f.balanceCents, f.currency)], ['Due', f.dueOn ? formatDate(f.dueOn) : 'On receipt']];
  const paras = [`Hello ${f.customerName},`, `A friendly reminder that invoice ${f.numberText} is ${f.when}. If you have already paid, thank you, and please ignore this note.`];
  return { to: f.to, subject, text: text(subject, rows, paras, f.url), html: page(subject, rows, paras, { url: f.url, label: 'View and pay the invoice' }) };
}
