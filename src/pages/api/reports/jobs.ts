import { route } from '../../../server/http.ts';
import { reportFilter } from '../../../lib/reports/filters.ts';
import { jobsReport, reportCsv } from '../../../server/services/reports.ts';

/** Each job's contract, billed, collected, cost, gross profit and margin against its estimate. */
export const GET = route({
  access: 'reports:read',
  query: reportFilter,
  handle: ({ actor, query }) => (query.format === 'csv' ? reportCsv(actor, 'jobs', query) : jobsReport(actor, query)),
});
