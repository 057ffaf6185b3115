import { idParam, route } from '../../../server/http.ts';
import { customerInput } from '../../../lib/customers/schema.ts';
import { patchOf } from '../../../lib/patch.ts';
import { getCustomer, updateCustomer } from '../../../server/services/customers.ts';

export const GET = route({ access: 'customers:read', handle: ({ actor, params }) => getCustomer(actor, idParam(params.id, 'That customer')) });
export const PATCH = route({
  access: 'customers:write',
  body: patchOf(customerInput),
  handle: ({ actor, params, body }) => updateCustomer(actor, idParam(params.id, 'That customer'), body),
});
