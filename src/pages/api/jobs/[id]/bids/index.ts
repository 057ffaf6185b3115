import { idParam, route } from '../../../../../server/http.ts';
import { bidInput } from '../../../../../lib/bids/schema.ts';
import { listBids, saveBid } from '../../../../../server/services/bids.ts';

const job = (p: string | undefined) => idParam(p, 'That job');
export const GET = route({ access: 'bids:read', handle: ({ actor, params }) => listBids(actor, job(params.id)) });
/** Saves the builder's input as the next numbered version, priced on the server. */
export const POST = route({ access: 'bids:write', body: bidInput, status: 201, handle: ({ actor, params, body }) => saveBid(actor, job(params.id), body) });
