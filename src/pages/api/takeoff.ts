import { route } from '../../server/http.ts';
import { takeoffRequest } from '../../lib/bids/schema.ts';
import { takeoff } from '../../server/services/bids.ts';

/** The takeoff for runs and gates with a saved style or an inline recipe; nothing is saved. */
export const POST = route({ access: 'bids:read', body: takeoffRequest, handle: ({ actor, body }) => takeoff(actor, body) });
