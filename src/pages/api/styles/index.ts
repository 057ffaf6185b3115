import { route } from '../../../server/http.ts';
import { listStyles } from '../../../server/repos/styles.ts';
import { styleInput } from '../../../lib/takeoff/recipe.ts';
import { createStyle, listStyles as listFull } from '../../../server/services/styles.ts';
import { z } from 'zod';

/** ?full=1 adds each style's recipe. */
export const GET = route({
  access: 'styles:read',
  query: z.strictObject({ full: z.enum(['0', '1']).optional() }),
  handle: async ({ actor, query }) => ({ items: query.full === '1' ? await listFull(actor) : await listStyles(actor.companyId) }),
});
export const POST = route({ access: 'styles:write', body: styleInput, status: 201, handle: ({ actor, body }) => createStyle(actor, body) });
