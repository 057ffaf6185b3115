import { idParam, route } from '../../../../server/http.ts';
import { issueInvoice } from '../../../../server/services/invoices.ts';

export const POST = route({ access: 'invoices:send', handle: ({ actor, params }) => issueInvoice(actor, idParam(params.id, 'That invoice')) });
