import { idParam, route } from '../../../../server/http.ts';
import { checklistInput } from '../../../../lib/checklist/checklist.ts';
import { getChecklist, updateChecklist } from '../../../../server/services/checklist.ts';

const job = (p: string | undefined) => idParam(p, 'That job');
/** Anyone who sees the job sees its checklist: the crew needs the ticket before digging. */
export const GET = route({ access: 'jobs:read', handle: ({ actor, params }) => getChecklist(actor, job(params.id)) });
export const PATCH = route({ access: 'checklist:write', body: checklistInput, handle: ({ actor, params, body }) => updateChecklist(actor, job(params.id), body) });
