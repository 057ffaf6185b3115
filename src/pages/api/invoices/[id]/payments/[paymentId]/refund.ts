import { idParam, route } from '../../../../../../server/http.ts';
import { refundInput } from '../../../../../../lib/billing/schema.ts';
import { refundPayment } from '../../../../../../server/services/payments.ts';
import { AppError } from '../../../../../../lib/errors.ts';

export const POST = route({
  access: 'payments:refund',
  body: refundInput,
  handle: async ({ actor, params, body }) => {
    const inv = await refundPayment(actor, idParam(params.paymentId, 'That payment'), body);
    if (inv.id !== idParam(params.id, 'That invoice')) throw new AppError('NOT_FOUND', 'That payment was not found.');
    return inv;
  },
});
