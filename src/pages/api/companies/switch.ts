import { route } from '../../../server/http.ts';
import { switchInput } from '../../../lib/auth/schema.ts';
import { switchCompany } from '../../../server/services/companies.ts';

export const POST = route({
  access: 'signed-in',
  body: switchInput,
  handle: async ({ ctx, actor, body }) => {
    await switchCompany(actor.userId, ctx.locals.sessionId ?? '', body.organizationId);
    return { ok: true };
  },
});
