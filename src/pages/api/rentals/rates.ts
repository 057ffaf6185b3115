import { route } from '../../../server/http.ts';
import { rateCardInput } from '../../../lib/rentals/schema.ts';
import { getRateCard, saveRateCard } from '../../../server/services/rentals.ts';

export const GET = route({ access: 'time:read_all', handle: ({ actor }) => getRateCard(actor) });
export const PUT = route({ access: 'costs:write', body: rateCardInput, handle: ({ actor, body }) => saveRateCard(actor, body) });
