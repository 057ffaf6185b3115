import { auth } from '../../src/server/auth/auth.ts';
import { ALLOWED_AUTH_ROUTES } from '../../src/server/auth/allowed.ts';
import { Client } from './client.ts';
import { PASSWORD, uniqueEmail, type TestCompany } from './factory.ts';

export type AuthCaller = 'owner' | 'bookkeeper' | 'estimator' | 'crew_lead' | 'signed out' | 'member of another company';
export const AUTH_CALLERS: AuthCaller[] = ['owner', 'bookkeeper', 'estimator', 'crew_lead', 'signed out', 'member of another company'];

/** Every endpoint better-auth (with our plugins) would serve, read from the library itself. */
export function betterAuthEndpoints(): { name: string; methods: string[]; path: string }[] {
  const out: { name: string; methods: string[]; path: string }[] = [];
  for (const [name, ep] of Object.entries(auth().api as Record<string, { path?: string; options?: { method?: string | string[] } }>)) {
    if (!ep.path) continue; // server-only: not routed over HTTP at all
    const m = ep.options?.method ?? 'GET';
    const methods = (Array.isArray(m) ? m : [m]).flatMap((x) => (x === '*' ? ['GET', 'POST'] : [x]));
    out.push({ name, methods, path: ep.path });
  }
  return out;
}

interface Probe {
  /** The request each caller sends. */
  send: (c: Client, co: TestCompany) => Promise<{ status: number }>;
  /** The status each caller gets. */
  expect: (caller: AuthCaller) => number;
  /** A session of its own for each caller, when the request ends or changes it. */
  ownSession?: boolean;
}

const probe = (c: Client, path: string) => c.post(path, { __matrixProbe: true });
const everyone = (status: number) => () => status;

/**
 * What each allowed endpoint answers each caller. A probe body no schema accepts gets 400
 * (and changes nothing); sign-out and invitations are sent for real.
 */
export const AUTH_PROBES: Record<string, Probe> = {
  'POST /sign-in/email': { send: (c) => probe(c, '/api/auth/sign-in/email'), expect: everyone(400) },
  'POST /sign-up/email': { send: (c) => probe(c, '/api/auth/sign-up/email'), expect: everyone(400) },
  'POST /sign-out': { send: (c) => c.post('/api/auth/sign-out', {}), expect: everyone(200), ownSession: true },
  'GET /verify-email': { send: (c) => c.get('/api/auth/verify-email?token=made-up&callbackURL=/sign-in'), expect: everyone(302) },
  'POST /request-password-reset': { send: (c) => probe(c, '/api/auth/request-password-reset'), expect: everyone(400) },
  'GET /reset-password/:token': { send: (c) => c.get('/api/auth/reset-password/madeUpToken123?callbackURL=/reset-password'), expect: everyone(302) },
  'POST /reset-password': { send: (c) => probe(c, '/api/auth/reset-password'), expect: everyone(400) },
  'POST /organization/accept-invitation': {
    // An invitation for somebody else: nobody but its recipient may take it.
    send: async (c, co) => {
      const inv = await co.owner.post('/api/members/invitations', { email: uniqueEmail('matrix'), role: 'crew_lead' });
      return c.post('/api/auth/organization/accept-invitation', { invitationId: inv.body.id });
    },
    expect: (caller) => (caller === 'signed out' ? 401 : 403),
  },
};

/** A fresh signed-in client for a caller (for probes that end the session). */
export async function freshSession(caller: AuthCaller, a: TestCompany, b: TestCompany): Promise<Client> {
  const c = new Client();
  if (caller === 'signed out') return c;
  const email = caller === 'member of another company' ? b.emails.owner : a.emails[caller];
  const r = await c.signIn(email, PASSWORD);
  if (r.status !== 200) throw new Error(`sign-in for ${caller}: ${r.status}`);
  return c;
}

export const allowedKeys = (): string[] => ALLOWED_AUTH_ROUTES.map((r) => `${r.method} ${r.path}`);
