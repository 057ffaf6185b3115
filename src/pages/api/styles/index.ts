import { route } from '../../../server/http.ts';
import { listStyles } from '../../../server/repos/styles.ts';

export const GET = route({ access: 'styles:read', handle: async ({ actor }) => ({ items: await listStyles(actor.companyId) }) });
