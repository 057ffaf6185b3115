import { route } from '../../../server/http.ts';
import { timeOptions } from '../../../server/services/time.ts';

export const GET = route({ access: 'time:log', handle: ({ actor }) => timeOptions(actor) });
