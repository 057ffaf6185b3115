import { idParam, route } from '../../../server/http.ts';
import { manualCostInput } from '../../../lib/costs/schema.ts';
import { deleteManualCost, manualCost, updateManualCost } from '../../../server/services/costs.ts';

const id = (p: Record<string, string | undefined>) => idParam(p.id, 'That cost');
export const GET = route({ access: 'costs:read', handle: ({ actor, params }) => manualCost(actor, id(params)) });
export const PUT = route({ access: 'costs:write', body: manualCostInput, handle: ({ actor, params, body }) => updateManualCost(actor, id(params), body) });
export const DELETE = route({ access: 'costs:write', handle: ({ actor, params }) => deleteManualCost(actor, id(params)) });
