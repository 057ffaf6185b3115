import { route } from '../../../server/http.ts';
import { listRates } from '../../../server/services/styles.ts';

export const GET = route({ access: 'styles:read', handle: ({ actor }) => listRates(actor) });
