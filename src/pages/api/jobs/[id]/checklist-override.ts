import { idParam, route } from '../../../../server/http.ts';
import { overrideInput } from '../../../../lib/checklist/checklist.ts';
import { clearOverride, overrideGate } from '../../../../server/services/checklist.ts';

const job = (p: string | undefined) => idParam(p, 'That job');
/** The owner lets the job build without a current locate ticket, with a written reason. */
export const POST = route({ access: 'checklist:override', body: overrideInput, handle: ({ actor, params, body }) => overrideGate(actor, job(params.id), body.reason) });
export const DELETE = route({ access: 'checklist:override', handle: ({ actor, params }) => clearOverride(actor, job(params.id)) });
