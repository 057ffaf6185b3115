import { idParam, route } from '../../../../../server/http.ts';
import { splitInput } from '../../../../../lib/costs/schema.ts';
import { splitLine } from '../../../../../server/services/receipt-lines.ts';

export const POST = route({ access: 'receipts:write', body: splitInput, handle: ({ actor, params, body }) => splitLine(actor, idParam(params.id, 'That receipt line'), body) });
