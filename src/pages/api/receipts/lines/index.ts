import { route } from '../../../../server/http.ts';
import { receiptLineQuery } from '../../../../lib/costs/schema.ts';
import { listReceiptLines } from '../../../../server/services/receipt-lines.ts';

export const GET = route({ access: 'receipts:read', query: receiptLineQuery, handle: ({ actor, query }) => listReceiptLines(actor, query) });
