import { idParam, route } from '../../../server/http.ts';
import { workerPatch } from '../../../lib/labour/schema.ts';
import { getWorker, updateWorker } from '../../../server/services/workers.ts';

export const GET = route({ access: 'workers:read', handle: ({ actor, params }) => getWorker(actor, idParam(params.id, 'That worker')) });
export const PATCH = route({ access: 'workers:write', body: workerPatch, handle: ({ actor, params, body }) => updateWorker(actor, idParam(params.id, 'That worker'), body) });
