import { z } from 'zod';
import { idParam, route } from '../../../server/http.ts';
import { ratesSchema } from '../../../lib/takeoff/rates.ts';
import { rateHistory, setRates } from '../../../server/services/styles.ts';

const id = (p: string | undefined) => idParam(p, 'That fence style');
const body = z.strictObject({
  values: ratesSchema.partial(),
  reason: z.string().trim().min(5, 'Say why the rates change (at least 5 characters).').max(1000),
});

export const GET = route({ access: 'styles:read', handle: ({ actor, params }) => rateHistory(actor, id(params.styleId)) });
/** Writes a new version of each changed rate, with who, when and why. */
export const POST = route({ access: 'styles:write', body, status: 201, handle: ({ actor, params, body }) => setRates(actor, id(params.styleId), body.values, body.reason) });
