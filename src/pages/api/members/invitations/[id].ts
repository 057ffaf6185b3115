import { route } from '../../../../server/http.ts';
import { cancelInvitation } from '../../../../server/services/members.ts';

export const DELETE = route({
  access: 'members:manage',
  handle: ({ ctx, actor, params }) => cancelInvitation(actor, ctx.request.headers, params.id ?? ''),
});
