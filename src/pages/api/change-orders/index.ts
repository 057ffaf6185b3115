import { z } from 'zod';
import { route } from '../../../server/http.ts';
import { changeOrderInput } from '../../../lib/billing/schema.ts';
import { createChangeOrder, listChangeOrders } from '../../../server/services/change-orders.ts';

export const GET = route({ access: 'invoices:read', query: z.strictObject({ jobId: z.coerce.number().int().positive() }), handle: ({ actor, query }) => listChangeOrders(actor, query.jobId) });
export const POST = route({ access: 'invoices:draft', body: changeOrderInput, status: 201, handle: ({ actor, body }) => createChangeOrder(actor, body) });
