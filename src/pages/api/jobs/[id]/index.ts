import { idParam, route } from '../../../../server/http.ts';
import { jobPatch } from '../../../../lib/jobs/schema.ts';
import { getJob, updateJob } from '../../../../server/services/jobs.ts';

export const GET = route({ access: 'jobs:read', handle: ({ actor, params }) => getJob(actor, idParam(params.id, 'That job')) });
export const PATCH = route({
  access: 'jobs:write',
  body: jobPatch,
  handle: ({ actor, params, body }) => updateJob(actor, idParam(params.id, 'That job'), body),
});
