import { route } from '../../../server/http.ts';
import { roleInput } from '../../../lib/auth/schema.ts';
import { changeRole, removeMember } from '../../../server/services/members.ts';
import { notFound } from '../../../lib/errors.ts';

function memberId(v: string | undefined): string {
  if (!v || v.length > 36) throw notFound('That member');
  return v;
}

export const PATCH = route({
  access: 'members:manage',
  body: roleInput,
  handle: ({ actor, params, body }) => changeRole(actor, memberId(params.id), body.role),
});
export const DELETE = route({
  access: 'members:manage',
  handle: ({ actor, params }) => removeMember(actor, memberId(params.id)),
});
