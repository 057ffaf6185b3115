import { idParam, route } from '../../../server/http.ts';
import { priceItemPatch } from '../../../lib/pricing/pricebook.ts';
import { deleteItem, getItem, updateItem } from '../../../server/services/pricebook.ts';

const id = (p: string | undefined) => idParam(p, 'That price-book item');
export const GET = route({ access: 'pricebook:read', handle: ({ actor, params }) => getItem(actor, id(params.id)) });
export const PATCH = route({ access: 'pricebook:write', body: priceItemPatch, handle: ({ actor, params, body }) => updateItem(actor, id(params.id), body) });
export const DELETE = route({ access: 'pricebook:write', handle: ({ actor, params }) => deleteItem(actor, id(params.id)) });
