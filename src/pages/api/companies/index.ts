import { route } from '../../../server/http.ts';
import { companyInput } from '../../../lib/auth/schema.ts';
import { createCompanyInSession } from '../../../server/services/companies.ts';

/** A signed-in person starts another company (they are its owner) and works in it. */
export const POST = route({
  access: 'signed-in',
  body: companyInput,
  status: 201,
  handle: ({ ctx, actor, body }) => createCompanyInSession(actor.userId, ctx.locals.sessionId ?? '', body.name),
});
