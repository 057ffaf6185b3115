import { auth } from '../../../server/auth/auth.ts';
import { AppError } from '../../../lib/errors.ts';
import { route } from '../../../server/http.ts';
import { changePasswordInput } from '../../../lib/auth/schema.ts';

/**
 * A signed-in person changes their password. Every session of theirs ends, on every device,
 * and this one is replaced by a fresh session (its cookie comes with the answer).
 */
export const POST = route({
  access: 'signed-in',
  body: changePasswordInput,
  handle: async ({ ctx, body }) => {
    const res = await auth().api.changePassword({
      body: { currentPassword: body.currentPassword, newPassword: body.newPassword, revokeOtherSessions: true },
      headers: ctx.request.headers,
      asResponse: true,
    });
    if (!res.ok) {
      const err = (await res.json().catch(() => ({}))) as { code?: string; message?: string };
      if (err.code === 'INVALID_PASSWORD') throw new AppError('BAD_INPUT', 'That is not your current password.', { currentPassword: 'Not your current password.' });
      throw new AppError('BAD_INPUT', err.message ?? 'The password was not changed.', { newPassword: err.message ?? 'Not accepted.' });
    }
    const out = new Response(JSON.stringify({ ok: true }), { status: 200, headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' } });
    for (const c of res.headers.getSetCookie()) out.headers.append('set-cookie', c);
    return out;
  },
});
