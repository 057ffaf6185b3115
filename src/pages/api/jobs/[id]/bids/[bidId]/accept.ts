import { idParam, route } from '../../../../../../server/http.ts';
import { acceptBid } from '../../../../../../server/services/bids.ts';

/** Accepting fixes the job's contract price and estimated cost by category. */
export const POST = route({ access: 'bids:write', handle: ({ actor, params }) => acceptBid(actor, idParam(params.id, 'That job'), idParam(params.bidId, 'That bid')) });
