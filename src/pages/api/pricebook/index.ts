import { route } from '../../../server/http.ts';
import { priceBookQuery, priceItemInput } from '../../../lib/pricing/pricebook.ts';
import { createItem, listItems } from '../../../server/services/pricebook.ts';

export const GET = route({ access: 'pricebook:read', query: priceBookQuery, handle: ({ actor, query }) => listItems(actor, query) });
export const POST = route({ access: 'pricebook:write', body: priceItemInput, status: 201, handle: ({ actor, body }) => createItem(actor, body) });
