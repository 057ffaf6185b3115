import { route } from '../../../server/http.ts';
import { exportCsv } from '../../../server/services/pricebook.ts';

export const GET = route({
  access: 'pricebook:read',
  handle: async ({ actor }) =>
    new Response(await exportCsv(actor), {
      headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="price-book.csv"', 'cache-control': 'no-store' },
    }),
});
