import { route } from '../../../../server/http.ts';
import { inviteInput } from '../../../../lib/auth/schema.ts';
import { invite } from '../../../../server/services/members.ts';

export const POST = route({
  access: 'members:manage',
  body: inviteInput,
  status: 201,
  handle: ({ ctx, actor, body }) => invite(actor, ctx.request.headers, body),
});
