import { z } from 'zod';
import { route } from '../../../server/http.ts';
import { importCsv } from '../../../server/services/pricebook.ts';

const body = z.strictObject({
  csv: z.string().min(1, 'Choose a CSV file.').max(2_000_000, 'The file is larger than 2 MB.'),
  dryRun: z.boolean().default(false),
  fileName: z.string().trim().max(100).nullish().transform((v) => v || null),
});

export const POST = route({ access: 'pricebook:write', body, maxBytes: 2_500_000, handle: ({ actor, body }) => importCsv(actor, body.csv, body.dryRun, body.fileName) });
