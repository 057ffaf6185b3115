import { idParam, route } from '../../../../server/http.ts';
import { sendInvoice } from '../../../../server/services/invoices.ts';

/** Sends an issued invoice by e-mail (a draft is issued first, in the same transaction). */
export const POST = route({ access: 'invoices:send', handle: ({ actor, params }) => sendInvoice(actor, idParam(params.id, 'That invoice')) });
