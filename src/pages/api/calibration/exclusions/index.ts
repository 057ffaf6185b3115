import { route } from '../../../../server/http.ts';
import { exclusionInput } from '../../../../lib/calibration/schema.ts';
import { addExclusion } from '../../../../server/services/calibration.ts';

/** Leaves a finished job, or one item of it, out of calibration with a reason. */
export const POST = route({ access: 'calibration:apply', body: exclusionInput, status: 201, handle: ({ actor, body }) => addExclusion(actor, body) });
