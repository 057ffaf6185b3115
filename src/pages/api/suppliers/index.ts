import { z } from 'zod';
import { route } from '../../../server/http.ts';
import { addSupplier, listSuppliers } from '../../../server/services/suppliers.ts';

const supplierInput = z.strictObject({ name: z.string().trim().min(1, 'Give the supplier’s name.').max(160) });

export const GET = route({ access: 'costs:read', handle: async ({ actor }) => ({ items: await listSuppliers(actor) }) });
export const POST = route({ access: 'receipts:write', body: supplierInput, status: 201, handle: ({ actor, body }) => addSupplier(actor, body.name) });
