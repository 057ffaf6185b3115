import { idParam, route } from '../../../../server/http.ts';
import { costingQuery } from '../../../../lib/costs/schema.ts';
import { getJobCosting } from '../../../../server/services/costing.ts';

export const GET = route({ access: 'costs:read', query: costingQuery, handle: ({ actor, params, query }) => getJobCosting(actor, idParam(params.id, 'That job'), query.flagPct) });
