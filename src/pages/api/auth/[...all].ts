import type { APIRoute } from 'astro';
import { auth, CLIENT_IP_HEADER } from '../../../server/auth/auth.ts';
import { REDIRECT_FIELDS, allowedAuthRoute } from '../../../server/auth/allowed.ts';
import { errorResponse, handleError, readJson } from '../../../server/http.ts';
import { safeNextPath } from '../../../lib/auth/safe-path.ts';
import { AppError } from '../../../lib/errors.ts';

/** Auth requests are small forms; nothing legitimate comes near this. */
const MAX_AUTH_BODY_BYTES = 16 * 1024;

/** A redirect target that is not a plain path on this site, by field name; null when all are. */
function unsafeRedirect(values: Record<string, unknown>): string | null {
  for (const field of REDIRECT_FIELDS) {
    const v = values[field];
    if (v === undefined || v === null) continue;
    if (typeof v !== 'string' || safeNextPath(v) === null) return field;
  }
  return null;
}

/**
 * better-auth's own routes, only those on the allow-list (src/server/auth/allowed.ts);
 * every other path under /api/auth answers a JSON 404. Redirect targets must be paths on
 * this site. The client address for rate limiting comes from the socket, never from a
 * header the client sent: any incoming copy of our header is replaced.
 */
export const ALL: APIRoute = async (ctx) => {
  try {
    const { method } = ctx.request;
    const sub = ctx.url.pathname.replace(/^\/api\/auth/, '');
    if (!allowedAuthRoute(method, sub)) return errorResponse('NOT_FOUND', 'There is no such endpoint.');

    const query = Object.fromEntries(ctx.url.searchParams);
    let bodyText: string | undefined;
    let bad = unsafeRedirect(query);
    if (method === 'POST') {
      const parsed = await readJson(ctx.request, MAX_AUTH_BODY_BYTES);
      bodyText = JSON.stringify(parsed ?? {});
      if (parsed && typeof parsed === 'object' && !Array.isArray(parsed)) bad ??= unsafeRedirect(parsed as Record<string, unknown>);
    }
    if (bad) throw new AppError('BAD_INPUT', 'That address is not a page of this site.', { [bad]: 'Use a path on this site.' });

    const headers = new Headers(ctx.request.headers);
    headers.set(CLIENT_IP_HEADER, ctx.clientAddress);
    headers.delete('content-length');
    const request = new Request(ctx.request.url, { method, headers, body: bodyText });
    return await auth().handler(request);
  } catch (err) {
    return handleError(err);
  }
};
