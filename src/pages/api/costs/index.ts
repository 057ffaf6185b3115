import { route } from '../../../server/http.ts';
import { costListQuery, manualCostInput } from '../../../lib/costs/schema.ts';
import { createManualCost, listCosts } from '../../../server/services/costs.ts';

export const GET = route({ access: 'costs:read', query: costListQuery, handle: ({ actor, query }) => listCosts(actor, query) });
export const POST = route({ access: 'costs:write', body: manualCostInput, status: 201, handle: ({ actor, body }) => createManualCost(actor, body) });
