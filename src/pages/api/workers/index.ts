import { route } from '../../../server/http.ts';
import { workerInput } from '../../../lib/labour/schema.ts';
import { createWorker, listWorkers } from '../../../server/services/workers.ts';

export const GET = route({ access: 'workers:read', handle: async ({ actor }) => ({ items: await listWorkers(actor) }) });
export const POST = route({ access: 'workers:write', body: workerInput, status: 201, handle: ({ actor, body }) => createWorker(actor, body) });
