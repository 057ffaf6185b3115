import { idParam, route } from '../../../server/http.ts';
import { stylePatch } from '../../../lib/takeoff/recipe.ts';
import { getStyle, updateStyle } from '../../../server/services/styles.ts';

const id = (p: string | undefined) => idParam(p, 'That fence style');
export const GET = route({ access: 'styles:read', handle: ({ actor, params }) => getStyle(actor, id(params.id)) });
export const PATCH = route({ access: 'styles:write', body: stylePatch, handle: ({ actor, params, body }) => updateStyle(actor, id(params.id), body) });
