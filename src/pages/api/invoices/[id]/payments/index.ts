import { idParam, route } from '../../../../../server/http.ts';
import { paymentInput } from '../../../../../lib/billing/schema.ts';
import { recordPayment } from '../../../../../server/services/payments.ts';

export const POST = route({ access: 'payments:write', body: paymentInput, status: 201, handle: ({ actor, params, body }) => recordPayment(actor, idParam(params.id, 'That invoice'), body) });
