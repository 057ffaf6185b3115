import { route } from '../../../server/http.ts';
import { reportFilter } from '../../../lib/reports/filters.ts';
import { marginReport, reportCsv } from '../../../server/services/reports.ts';

/** Gross margin by month of the jobs' report dates. */
export const GET = route({
  access: 'reports:read',
  query: reportFilter,
  handle: async ({ actor, query }) => {
    if (query.format === 'csv') return reportCsv(actor, 'margin-by-month', query);
    const r = await marginReport(actor, query);
    return { currency: r.currency, today: r.today, filter: r.filter, months: r.months };
  },
});
