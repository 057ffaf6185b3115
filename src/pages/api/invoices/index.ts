import { route } from '../../../server/http.ts';
import { invoiceDraftInput, invoiceListQuery } from '../../../lib/billing/schema.ts';
import { createDraft, listInvoices } from '../../../server/services/invoices.ts';

export const GET = route({ access: 'invoices:read', query: invoiceListQuery, handle: ({ actor, query }) => listInvoices(actor, query) });
export const POST = route({ access: 'invoices:draft', body: invoiceDraftInput, status: 201, handle: ({ actor, body }) => createDraft(actor, body) });
