import { route } from '../../../server/http.ts';
import { listSuppliers } from '../../../server/services/pricebook.ts';

export const GET = route({ access: 'pricebook:read', handle: ({ actor }) => listSuppliers(actor) });
