import { idParam, route } from '../../../../server/http.ts';
import { changeOrderDecision } from '../../../../lib/billing/schema.ts';
import { decideChangeOrder } from '../../../../server/services/change-orders.ts';

/** Records the customer's approval (on a date, by a named person) or refusal. */
export const POST = route({ access: 'invoices:draft', body: changeOrderDecision, handle: ({ actor, params, body }) => decideChangeOrder(actor, idParam(params.id, 'That change order'), body) });
