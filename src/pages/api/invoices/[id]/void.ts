import { idParam, route } from '../../../../server/http.ts';
import { voidInput } from '../../../../lib/billing/schema.ts';
import { voidInvoice } from '../../../../server/services/invoices.ts';

export const POST = route({ access: 'invoices:send', body: voidInput, handle: ({ actor, params, body }) => voidInvoice(actor, idParam(params.id, 'That invoice'), body) });
