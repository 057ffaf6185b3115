import { defineMiddleware } from 'astro:middleware';
import { identify } from './server/auth/session.ts';
import { errorResponse, isDbDown } from './server/http.ts';
import { databaseUp } from './server/db.ts';
import { assertReadyToServe, env } from './server/env.ts';

// The server's start script runs this check before listening (src/cli/serve.mjs); here it
// also stops a server started any other way from answering half configured.
assertReadyToServe();

/** Pages and endpoints anyone may open. */
const PUBLIC_PAGES = [/^\/sign-in\/?$/, /^\/sign-up\/?$/, /^\/forgot-password\/?$/, /^\/reset-password\/?$/, /^\/accept-invite\//, /^\/pay\//, /^\/404\/?$/];
const PUBLIC_API = [/^\/api\/health\/?$/, /^\/api\/auth\//, /^\/api\/signup\/?$/, /^\/api\/public\//, /^\/api\/stripe\/webhook\/?$/];
/** Signed server-to-server calls: their own signature replaces the Origin check. */
const ORIGIN_EXEMPT = [/^\/api\/stripe\/webhook\/?$/];
/** Signed in but not yet in a company: only these. */
const NO_COMPANY_PAGES = [/^\/welcome\/?$/, /^\/accept-invite\//];

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function securityHeaders(res: Response): Response {
  const h = res.headers;
  // Pages already carry Astro's own policy (experimental.csp) with the hashes of its inline
  // scripts and styles. A second policy is appended; a browser enforces both, so inline
  // code runs only when Astro listed its hash, and this one adds frame-ancestors and the rest.
  h.append(
    'content-security-policy',
    [
      "default-src 'self'",
      "script-src 'self' 'unsafe-inline'",
      "style-src 'self' 'unsafe-inline'",
      "img-src 'self' data: blob:",
      "font-src 'self'",
      "connect-src 'self'",
      "form-action 'self'",
      "frame-ancestors 'none'",
      "base-uri 'self'",
      "object-src 'none'",
    ].join('; '),
  );
  h.set('x-content-type-options', 'nosniff');
  h.set('referrer-policy', 'strict-origin-when-cross-origin');
  h.set('x-frame-options', 'DENY');
  h.set('permissions-policy', 'camera=(), microphone=(), geolocation=()');
  // Served over HTTPS: browsers must never try plain http for this host again (a year).
  if (env().APP_URL.startsWith('https:')) h.set('strict-transport-security', 'max-age=31536000; includeSubDomains');
  return res;
}

function dbDownPage(): Response {
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Tallypost is catching its breath</title>
<meta name="viewport" content="width=device-width,initial-scale=1">
<style>body{font-family:system-ui,sans-serif;background:#fbf7f1;color:#1f262b;display:grid;place-items:center;min-height:100vh;margin:0}
main{max-width:32rem;padding:2rem;background:#fff;border:1px solid #e8d3b5;border-radius:.5rem}h1{font-size:1.25rem;color:#7c4728}</style></head>
<body><main><h1>We can't reach the database right now</h1><p>Your work is safe. Tallypost will come back by itself as soon as the database answers again; try this page again in a minute.</p><p><a href="">Try again</a></p></main></body></html>`;
  return new Response(html, { status: 503, headers: { 'content-type': 'text/html; charset=utf-8', 'retry-after': '10' } });
}

function sameOrigin(request: Request, url: URL): boolean {
  const origin = request.headers.get('origin');
  if (!origin) return false;
  if (origin === url.origin) return true;
  const trusted = [new URL(env().APP_URL).origin, ...env().TRUSTED_ORIGINS];
  return trusted.includes(origin);
}

export const onRequest = defineMiddleware(async (ctx, next) => {
  const { url, request } = ctx;
  const path = url.pathname;
  const isApi = path.startsWith('/api/');
  ctx.locals.user = null;
  ctx.locals.sessionId = null;
  ctx.locals.company = null;
  ctx.locals.role = null;
  ctx.locals.memberships = [];
  ctx.locals.dataVersion = null;

  // A write without an Origin, or from another site, is refused whatever its content type
  // (Astro's own check covers only form posts).
  if (!SAFE_METHODS.has(request.method) && !ORIGIN_EXEMPT.some((r) => r.test(path)) && !sameOrigin(request, url)) {
    return securityHeaders(errorResponse('ORIGIN_REFUSED', 'This request did not come from a Tallypost page.'));
  }

  if (path === '/api/health') return securityHeaders(await next());

  try {
    const who = await identify(request.headers);
    Object.assign(ctx.locals, who);
  } catch (err) {
    // better-auth may wrap the driver's error beyond recognition: ask the database itself.
    if (isDbDown(err) || !(await databaseUp())) {
      return securityHeaders(isApi ? errorResponse('DB_DOWN', 'The database is not reachable right now. Try again in a moment.') : dbDownPage());
    }
    throw err;
  }

  // An address no route matches renders the 404 page for everyone, signed in or not.
  const unmatched = ctx.routePattern === '/404';
  const isPublic = unmatched || (isApi ? PUBLIC_API.some((r) => r.test(path)) : PUBLIC_PAGES.some((r) => r.test(path)));
  if (!isApi && !isPublic) {
    if (!ctx.locals.user) {
      const nextUrl = path === '/' ? '' : `?next=${encodeURIComponent(path + url.search)}`;
      return ctx.redirect(`/sign-in${nextUrl}`, 302);
    }
    if (!ctx.locals.company && !NO_COMPANY_PAGES.some((r) => r.test(path))) {
      return ctx.redirect('/welcome', 302);
    }
  }

  try {
    return securityHeaders(await next());
  } catch (err) {
    if (isDbDown(err) || !(await databaseUp())) return securityHeaders(isApi ? errorResponse('DB_DOWN', 'The database is not reachable right now.') : dbDownPage());
    throw err;
  }
});
