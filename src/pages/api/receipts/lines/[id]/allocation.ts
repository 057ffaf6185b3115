import { idParam, route } from '../../../../../server/http.ts';
import { allocationInput } from '../../../../../lib/costs/schema.ts';
import { allocateLine } from '../../../../../server/services/receipt-lines.ts';

export const POST = route({ access: 'receipts:write', body: allocationInput, handle: ({ actor, params, body }) => allocateLine(actor, idParam(params.id, 'That receipt line'), body) });
