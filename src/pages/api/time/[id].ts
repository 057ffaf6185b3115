import { idParam, route } from '../../../server/http.ts';
import { timeEntryPatch } from '../../../lib/labour/schema.ts';
import { deleteTime, updateTime } from '../../../server/services/time.ts';

export const PATCH = route({ access: 'time:log', body: timeEntryPatch, handle: ({ actor, params, body }) => updateTime(actor, idParam(params.id, 'That time entry'), body) });
export const DELETE = route({ access: 'time:log', handle: ({ actor, params }) => deleteTime(actor, idParam(params.id, 'That time entry')) });
