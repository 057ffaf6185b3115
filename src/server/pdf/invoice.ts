import PDFDocument from 'pdfkit';
import { formatDate, formatMoney, type CurrencyCode } from '../../lib/format.ts';
import { TERMS_LABELS } from '../../lib/billing/terms.ts';
import { CUSTOMER_STATUS_LABELS } from '../../lib/billing/invoice.ts';
import type { InvoiceDetail } from '../services/invoices.ts';
import type { BillingSettings } from '../repos/billing-settings.ts';
import { INTER_REGULAR, INTER_SEMIBOLD } from './font.ts';

const INK = '#1f262b';
const MUTED = '#5e717e';
const TIMBER = '#7c4728';
const RULE = '#e8d3b5';

/** The invoice as a Letter-size PDF in the shipped Inter font. */
export function renderInvoicePdf(inv: InvoiceDetail, s: BillingSettings): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'LETTER', margin: 54, info: { Title: `Invoice ${inv.numberText ?? 'draft'}`, Author: s.companyName, Producer: 'Tallypost' } });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  doc.registerFont('Inter', INTER_REGULAR);
  doc.registerFont('Inter-SemiBold', INTER_SEMIBOLD);
  doc.font('Inter');
  const cur: CurrencyCode = s.currency;
  const m = (c: number) => formatMoney(c, cur);
  const left = 54;
  const width = doc.page.width - 108;
  const bottom = doc.page.height - 72;
  const strong = (text: string, x: number, y: number, opts: PDFKit.Mixins.TextOptions = {}) => doc.font('Inter-SemiBold').text(text, x, y, opts).font('Inter');

  doc.fillColor(TIMBER).fontSize(18);
  strong(s.companyName, left, 54, { width: width / 2 });
  doc.fillColor(MUTED).fontSize(9);
  const companyLines = [...s.address, [s.phone, s.email].filter(Boolean).join(' · '), s.licenseNumber ? `Licence ${s.licenseNumber}` : ''].filter(Boolean);
  doc.text(companyLines.join('\n'), left, doc.y + 2, { width: width / 2 });
  const afterCompany = doc.y;

  doc.fillColor(INK).fontSize(20);
  strong(inv.status === 'draft' ? 'DRAFT INVOICE' : 'INVOICE', left + width / 2, 54, { width: width / 2, align: 'right' });
  doc.fontSize(10).fillColor(INK);
  const facts: [string, string][] = [
    ['Invoice', inv.numberText ?? 'not yet issued'],
    ['Issued', formatDate(inv.issuedOn)],
    ['Terms', inv.terms === 'custom' ? `Net ${inv.termsDays} days` : TERMS_LABELS[inv.terms]],
    ['Due', formatDate(inv.dueOn)],
    ['Status', CUSTOMER_STATUS_LABELS[inv.displayStatus]],
  ];
  let y = 82;
  for (const [k, v] of facts) {
    doc.fillColor(MUTED).text(k, left + width / 2, y, { width: width / 4, align: 'right' });
    doc.fillColor(INK).text(v, left + (3 * width) / 4, y, { width: width / 4, align: 'right' });
    y += 14;
  }

  y = Math.max(afterCompany, y) + 18;
  doc.moveTo(left, y).lineTo(left + width, y).strokeColor(RULE).lineWidth(1).stroke();
  y += 10;
  doc.fontSize(9).fillColor(MUTED).text('BILL TO', left, y).text('JOB AND SITE', left + width / 2, y);
  doc.fontSize(10).fillColor(INK);
  doc.text([inv.customer.name, ...inv.customer.address].join('\n'), left, y + 13, { width: width / 2 - 12 });
  const yBill = doc.y;
  doc.text([`${inv.job.code} · ${inv.job.title}`, inv.job.site, inv.kindLabel].filter(Boolean).join('\n'), left + width / 2, y + 13, { width: width / 2 });
  y = Math.max(yBill, doc.y) + 18;

  const cols = { desc: left, qty: left + width * 0.58, unit: left + width * 0.68, amount: left + width * 0.84 };
  const header = () => {
    doc.rect(left, y, width, 18).fill('#f4eadb');
    doc.fillColor(INK).fontSize(9);
    doc.text('Description', cols.desc + 6, y + 5).text('Qty', cols.qty, y + 5, { width: width * 0.08, align: 'right' });
    doc.text('Unit price', cols.unit, y + 5, { width: width * 0.15, align: 'right' }).text('Amount', cols.amount, y + 5, { width: width * 0.16 - 6, align: 'right' });
    y += 24;
  };
  header();
  doc.fontSize(10);
  for (const l of inv.lines) {
    const h = doc.heightOfString(l.description + (l.taxable ? ' *' : ''), { width: width * 0.56 - 6 });
    if (y + h > bottom - 140) { doc.addPage(); y = 54; header(); doc.fontSize(10); }
    doc.fillColor(INK).text(l.description + (l.taxable ? ' *' : ''), cols.desc + 6, y, { width: width * 0.56 - 6 });
    doc.text(String(l.quantity), cols.qty, y, { width: width * 0.08, align: 'right' });
    doc.text(m(l.unitPriceCents), cols.unit, y, { width: width * 0.15, align: 'right' });
    doc.text(m(l.amountCents), cols.amount, y, { width: width * 0.16 - 6, align: 'right' });
    y += h + 6;
    doc.moveTo(left, y - 3).lineTo(left + width, y - 3).strokeColor('#eef1f3').lineWidth(0.5).stroke();
  }

  y += 6;
  const rows: [string, string, boolean?][] = [['Subtotal', m(inv.subtotalCents)]];
  if (inv.taxMode !== 'none') rows.push([`Sales tax ${inv.taxRatePct} % on ${m(inv.taxableCents)}${inv.taxMode === 'materials' ? ' (materials, marked *)' : ''}`, m(inv.taxCents)]);
  else rows.push(['Sales tax', 'none (paid at purchase)']);
  if (inv.retainageHeldCents) rows.push([`Retainage held, ${inv.retainagePct} % (billed at the end)`, `−${m(inv.retainageHeldCents)}`]);
  rows.push(['Invoice total', m(inv.totalCents), true]);
  rows.push(['Paid to date', m(inv.paidCents)]);
  rows.push(['Balance due', m(inv.balanceCents), true]);
  if (y > bottom - rows.length * 16 - 90) { doc.addPage(); y = 54; }
  for (const [k, v, bold] of rows) {
    doc.fontSize(bold ? 11 : 10).fillColor(bold ? INK : MUTED);
    if (bold) { strong(k, left + width * 0.3, y, { width: width * 0.5, align: 'right' }); strong(v, cols.amount - 20, y, { width: width * 0.16 + 14, align: 'right' }); }
    else { doc.text(k, left + width * 0.3, y, { width: width * 0.5, align: 'right' }); doc.fillColor(INK).text(v, cols.amount - 20, y, { width: width * 0.16 + 14, align: 'right' }); }
    y += bold ? 18 : 15;
  }

  y += 12;
  doc.moveTo(left, y).lineTo(left + width, y).strokeColor(RULE).lineWidth(1).stroke();
  y += 10;
  doc.fillColor(TIMBER).fontSize(11);
  strong('How to pay', left, y);
  doc.fillColor(INK).fontSize(9.5);
  const how = [`Due ${inv.dueOn ? formatDate(inv.dueOn) : 'on receipt'}. Please quote ${inv.numberText ?? 'the invoice number'} with your payment.`];
  if (inv.publicUrl && inv.balanceCents > 0) how.push('Online by card: open the link below and choose Pay online.');
  how.push(`By check payable to ${s.companyName}${s.address.length ? `, mailed to ${s.address.join(', ')}` : ''}.`);
  doc.text(how.join('\n'), left, y + 16, { width });
  if (inv.publicUrl) {
    doc.moveDown(0.4).fillColor(TIMBER).text(inv.publicUrl, { width, link: inv.publicUrl, underline: true });
  }
  if (inv.notes) doc.moveDown(0.8).fillColor(MUTED).fontSize(9).text(inv.notes, { width });
  doc.moveDown(0.8).fillColor(MUTED).fontSize(8).text('Fence work near buried utilities: the one-call locate (811 in the US) is requested before digging, and crews hand-dig near marks.', { width });
  doc.end();
  return done;
}
