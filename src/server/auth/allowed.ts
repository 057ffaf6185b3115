/**
 * The better-auth endpoints reachable from outside, each with the screen or mail that uses
 * it. Everything else under /api/auth answers 404: companies, members, invitations and
 * roles change only through the app's own guarded routes (src/pages/api/companies,
 * members), and better-auth's other endpoints (list-members, get-full-organization,
 * check-slug, update-user, delete-user, list-sessions, ...) serve no screen. The server
 * still calls any of them in-process through auth().api.
 */
export interface AllowedAuthRoute {
  method: 'GET' | 'POST';
  /** The path under /api/auth; `:token` stands for one path segment. */
  path: string;
  why: string;
}

export const ALLOWED_AUTH_ROUTES: readonly AllowedAuthRoute[] = [
  { method: 'POST', path: '/sign-in/email', why: 'the sign-in form' },
  { method: 'POST', path: '/sign-out', why: 'the Sign out button' },
  { method: 'POST', path: '/sign-up/email', why: 'an invited person creates their account on the invitation page' },
  { method: 'GET', path: '/verify-email', why: 'the link in the confirm-your-e-mail mail' },
  { method: 'POST', path: '/request-password-reset', why: 'the forgot-password form' },
  { method: 'GET', path: '/reset-password/:token', why: 'the link in the password-reset mail' },
  { method: 'POST', path: '/reset-password', why: 'the new-password form' },
  { method: 'POST', path: '/organization/accept-invitation', why: 'the Join button on the invitation page' },
];

const SEGMENT = /^[A-Za-z0-9_-]{1,200}$/;

/** The allowed route a request matches, or null. `path` is the part after /api/auth. */
export function allowedAuthRoute(method: string, path: string): AllowedAuthRoute | null {
  const parts = path.split('/');
  for (const r of ALLOWED_AUTH_ROUTES) {
    if (r.method !== method) continue;
    const want = r.path.split('/');
    if (want.length !== parts.length) continue;
    if (want.every((w, i) => (w.startsWith(':') ? SEGMENT.test(parts[i]) : w === parts[i]))) return r;
  }
  return null;
}

/** Fields of better-auth requests that name where the browser goes next. */
export const REDIRECT_FIELDS = ['callbackURL', 'redirectTo', 'errorCallbackURL', 'newUserCallbackURL'] as const;
