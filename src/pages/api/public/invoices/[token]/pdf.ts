import { route } from '../../../../../server/http.ts';
import { pdfResponse } from '../../../../../server/services/invoice-pdf.ts';
import { publicInvoicePdf } from '../../../../../server/services/public-invoices.ts';

export const GET = route({ access: 'public', handle: async ({ params }) => pdfResponse(await publicInvoicePdf(params.token)) });
