import { idParam, route } from '../../../../server/http.ts';
import { invoicePdf, pdfResponse } from '../../../../server/services/invoice-pdf.ts';

export const GET = route({ access: 'invoices:read', handle: async ({ actor, params }) => pdfResponse(await invoicePdf(actor.companyId, idParam(params.id, 'That invoice'))) });
