import { z } from 'zod';
import { route } from '../../../server/http.ts';
import { markSeen, unseenChanges } from '../../../server/services/pricebook.ts';

export const GET = route({ access: 'pricebook:read', handle: ({ actor }) => unseenChanges(actor) });
/** The estimator has looked at these changes (or at all of them). */
export const POST = route({
  access: 'pricebook:write',
  body: z.strictObject({ ids: z.union([z.literal('all'), z.array(z.number().int().positive()).min(1).max(500)]) }),
  handle: ({ actor, body }) => markSeen(actor, body.ids),
});
