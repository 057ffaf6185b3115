import { route } from '../../../server/http.ts';
import { reportFilter } from '../../../lib/reports/filters.ts';
import { marginReport, reportCsv } from '../../../server/services/reports.ts';

/** Margins by fence style, with the months and jobs its charts draw; ?format=csv for the style table. */
export const GET = route({
  access: 'reports:read',
  query: reportFilter,
  handle: ({ actor, query }) => (query.format === 'csv' ? reportCsv(actor, 'margin-by-style', query) : marginReport(actor, query)),
});
