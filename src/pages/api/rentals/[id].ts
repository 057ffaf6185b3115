import { idParam, route } from '../../../server/http.ts';
import { rentalInput } from '../../../lib/rentals/schema.ts';
import { deleteRental, getRental, updateRental } from '../../../server/services/rentals.ts';

const id = (p: Record<string, string | undefined>) => idParam(p.id, 'That rental');
export const GET = route({ access: 'time:log', handle: ({ actor, params }) => getRental(actor, id(params)) });
export const PUT = route({ access: 'time:log', body: rentalInput, handle: ({ actor, params, body }) => updateRental(actor, id(params), body) });
export const DELETE = route({ access: 'time:log', handle: ({ actor, params }) => deleteRental(actor, id(params)) });
