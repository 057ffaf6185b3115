import { route } from '../../../server/http.ts';
import { receivablesQuery } from '../../../lib/billing/schema.ts';
import { receivables, receivablesCsv } from '../../../server/services/receivables.ts';

export const GET = route({
  access: 'receivables:read',
  query: receivablesQuery,
  handle: async ({ actor, query }) => {
    if (query.format === 'json') return receivables(actor, query);
    const { csv, filename } = await receivablesCsv(actor, query);
    return new Response(csv, { headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${filename}"`, 'cache-control': 'no-store' } });
  },
});
