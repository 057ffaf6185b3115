import { idParam, route } from '../../../../server/http.ts';
import { removeExclusion } from '../../../../server/services/calibration.ts';

/** Counts the job in calibration again. */
export const DELETE = route({ access: 'calibration:apply', handle: ({ actor, params }) => removeExclusion(actor, idParam(params.id, 'That exclusion')) });
