import { route } from '../../../server/http.ts';
import { customerInput, customerListQuery } from '../../../lib/customers/schema.ts';
import { createCustomer, listCustomers } from '../../../server/services/customers.ts';

export const GET = route({ access: 'customers:read', query: customerListQuery, handle: ({ actor, query }) => listCustomers(actor, query) });
export const POST = route({ access: 'customers:write', body: customerInput, status: 201, handle: ({ actor, body }) => createCustomer(actor, body) });
