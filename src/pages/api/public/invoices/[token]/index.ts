import { route } from '../../../../../server/http.ts';
import { publicInvoice } from '../../../../../server/services/public-invoices.ts';

export const GET = route({ access: 'public', handle: ({ params }) => publicInvoice(params.token) });
