import { route } from '../../../server/http.ts';
import { costListQuery } from '../../../lib/costs/schema.ts';
import { exportCosts } from '../../../server/services/costs.ts';

export const GET = route({ access: 'costs:read', query: costListQuery, handle: ({ actor, query }) => exportCosts(actor, query, new Date().toISOString().slice(0, 10)) });
