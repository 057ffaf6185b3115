import { route } from '../../../server/http.ts';
import { companyInput } from '../../../lib/auth/schema.ts';
import { createCompany } from '../../../server/services/companies.ts';

/** A signed-in person starts another company (they are its owner). */
export const POST = route({
  access: 'signed-in',
  body: companyInput,
  status: 201,
  handle: ({ ctx, body }) => createCompany(ctx.request.headers, body.name),
});
