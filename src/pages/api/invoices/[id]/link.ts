import { idParam, route } from '../../../../server/http.ts';
import { revokeInvoiceLink } from '../../../../server/services/invoices.ts';

/** DELETE: revoke the customer's link (a new one replaces it). */
export const DELETE = route({ access: 'invoices:send', handle: ({ actor, params }) => revokeInvoiceLink(actor, idParam(params.id, 'That invoice')) });
