import { route } from '../../../server/http.ts';
import { listMembersAndInvites } from '../../../server/services/members.ts';

export const GET = route({ access: 'members:read', handle: ({ actor }) => listMembersAndInvites(actor) });
