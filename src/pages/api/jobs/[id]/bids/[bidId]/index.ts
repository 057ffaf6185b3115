import { idParam, route } from '../../../../../../server/http.ts';
import { bidPatch } from '../../../../../../lib/bids/schema.ts';
import { deleteBid, getBid, patchBid } from '../../../../../../server/services/bids.ts';

const ids = (p: Record<string, string | undefined>) => [idParam(p.id, 'That job'), idParam(p.bidId, 'That bid')] as const;
export const GET = route({ access: 'bids:read', handle: ({ actor, params }) => getBid(actor, ...ids(params)) });
export const PATCH = route({ access: 'bids:write', body: bidPatch, handle: ({ actor, params, body }) => patchBid(actor, ...ids(params), body) });
export const DELETE = route({ access: 'bids:write', handle: ({ actor, params }) => deleteBid(actor, ...ids(params)) });
