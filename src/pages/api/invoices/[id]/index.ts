import { idParam, route } from '../../../../server/http.ts';
import { invoiceDraftPatch } from '../../../../lib/billing/schema.ts';
import { discardDraft, getInvoice, updateDraft } from '../../../../server/services/invoices.ts';

const id = (p: Record<string, string | undefined>) => idParam(p.id, 'That invoice');
export const GET = route({ access: 'invoices:read', handle: ({ actor, params }) => getInvoice(actor, id(params)) });
export const PATCH = route({ access: 'invoices:draft', body: invoiceDraftPatch, handle: ({ actor, params, body }) => updateDraft(actor, id(params), body) });
export const DELETE = route({ access: 'invoices:draft', handle: ({ actor, params }) => discardDraft(actor, id(params)) });
