import { route } from '../../../server/http.ts';
import { rentalInput, rentalListQuery } from '../../../lib/rentals/schema.ts';
import { createRental, listRentals } from '../../../server/services/rentals.ts';

export const GET = route({ access: 'time:log', query: rentalListQuery, handle: ({ actor, query }) => listRentals(actor, query) });
export const POST = route({ access: 'time:log', body: rentalInput, status: 201, handle: ({ actor, body }) => createRental(actor, body) });
