import { route } from '../../../server/http.ts';
import { timeEntryInput, timeListQuery } from '../../../lib/labour/schema.ts';
import { listTime, logTime } from '../../../server/services/time.ts';

export const GET = route({ access: 'time:log', query: timeListQuery, handle: ({ actor, query }) => listTime(actor, query) });
export const POST = route({ access: 'time:log', body: timeEntryInput, status: 201, handle: async ({ actor, body }) => ({ items: await logTime(actor, body) }) });
