import { route } from '../../../server/http.ts';
import { applyInput } from '../../../lib/calibration/schema.ts';
import { applyCalibration } from '../../../server/services/calibration.ts';

/** Applies chosen suggestions as new rate versions (or recipe waste), with who, when and why. */
export const POST = route({ access: 'calibration:apply', body: applyInput, handle: ({ actor, body }) => applyCalibration(actor, body) });
