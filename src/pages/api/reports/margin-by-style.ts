import { route } from '../../../server/http.ts';
import { reportFilter } from '../../../lib/reports/filters.ts';
import { marginReport, reportCsv } from '../../../server/services/reports.ts';

/**
 * Margins by fence style and by month; ?format=csv for the style table. Sent with
 * Cache-Control: no-cache, the report is recomputed rather than served from the report cache.
 */
export const GET = route({
  access: 'reports:read',
  query: reportFilter,
  handle: ({ ctx, actor, query }) =>
    query.format === 'csv' ? reportCsv(actor, 'margin-by-style', query) : marginReport(actor, query, { fresh: /no-cache/i.test(ctx.request.headers.get('cache-control') ?? '') }),
});
