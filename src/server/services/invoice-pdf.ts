import { invoiceDetail } from './invoices.ts';
import { billingSettings } from '../repos/billing-settings.ts';
import { renderInvoicePdf } from '../pdf/invoice.ts';
import { AppError } from '../../lib/errors.ts';

/** The PDF of an invoice as it stands now (paid to date included). Drafts have none. */
export async function invoicePdf(companyId: string, id: number): Promise<{ pdf: Buffer; filename: string }> {
  const inv = await invoiceDetail(companyId, id);
  if (inv.status === 'draft') throw new AppError('RULE_BROKEN', 'A draft has no PDF yet; issue it first.');
  const pdf = await renderInvoicePdf(inv, await billingSettings(companyId));
  return { pdf, filename: `${inv.numberText}.pdf` };
}

export function pdfResponse(r: { pdf: Buffer; filename: string }, disposition: 'inline' | 'attachment' = 'inline'): Response {
  return new Response(new Uint8Array(r.pdf), {
    status: 200,
    headers: { 'content-type': 'application/pdf', 'content-disposition': `${disposition}; filename="${r.filename}"`, 'cache-control': 'private, no-store' },
  });
}
