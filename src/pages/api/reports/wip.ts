import { route } from '../../../server/http.ts';
import { wipFilter } from '../../../lib/reports/filters.ts';
import { reportCsv, wip } from '../../../server/services/reports.ts';

/** Work in progress: percent complete by cost, earned revenue, and over- or under-billing. */
export const GET = route({
  access: 'wip:read',
  query: wipFilter,
  handle: ({ actor, query }) => (query.format === 'csv' ? reportCsv(actor, 'wip', query) : wip(actor, query)),
});
