import { idParam, route } from '../../../../../../server/http.ts';
import { refundInput } from '../../../../../../lib/billing/schema.ts';
import { refundPayment } from '../../../../../../server/services/refunds.ts';

export const POST = route({
  access: 'payments:refund',
  body: refundInput,
  handle: ({ actor, params, body }) => refundPayment(actor, idParam(params.id, 'That invoice'), idParam(params.paymentId, 'That payment'), body),
});
