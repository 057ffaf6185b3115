import type { APIRoute } from 'astro';
import { auth, CLIENT_IP_HEADER } from '../../../server/auth/auth.ts';
import { handleError } from '../../../server/http.ts';

/**
 * better-auth's own routes (sign-in, sign-out, password reset, invitations, ...). The
 * client address for rate limiting comes from the socket, never from a header the client
 * sent: any incoming copy of our header is replaced.
 */
export const ALL: APIRoute = async (ctx) => {
  try {
    const headers = new Headers(ctx.request.headers);
    headers.set(CLIENT_IP_HEADER, ctx.clientAddress);
    const hasBody = !['GET', 'HEAD'].includes(ctx.request.method);
    const request = new Request(ctx.request.url, {
      method: ctx.request.method,
      headers,
      body: hasBody ? ctx.request.body : undefined,
      // @ts-expect-error Node's fetch needs duplex for a streamed body
      duplex: hasBody ? 'half' : undefined,
    });
    return await auth().handler(request);
  } catch (err) {
    return handleError(err);
  }
};
