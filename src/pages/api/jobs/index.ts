import { route } from '../../../server/http.ts';
import { jobInput, jobListQuery } from '../../../lib/jobs/schema.ts';
import { createJob, listJobs } from '../../../server/services/jobs.ts';

export const GET = route({ access: 'jobs:read', query: jobListQuery, handle: ({ actor, query }) => listJobs(actor, query) });
export const POST = route({ access: 'jobs:write', body: jobInput, status: 201, handle: ({ actor, body }) => createJob(actor, body) });
