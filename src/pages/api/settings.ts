import { route } from '../../server/http.ts';
import { settingsInput } from '../../lib/settings/schema.ts';
import { patchOf } from '../../lib/patch.ts';
import { getSettings, updateSettings } from '../../server/services/settings.ts';

export const GET = route({ access: 'settings:read', handle: ({ actor }) => getSettings(actor) });
export const PATCH = route({
  access: 'settings:write',
  body: patchOf(settingsInput),
  handle: ({ actor, body }) => updateSettings(actor, body),
});
