import { route } from '../../../server/http.ts';
import { calibrationQuery } from '../../../lib/calibration/schema.ts';
import { getCalibration } from '../../../server/services/calibration.ts';

/** Each style's finished jobs against its bids: suggested rates with their leave-one-out backtest. */
export const GET = route({ access: 'calibration:read', query: calibrationQuery, handle: ({ actor, query }) => getCalibration(actor, query) });
