import { beforeAll, describe, expect, it } from 'vitest';
import { ROLES, can, type Action, type Role } from '../../../src/lib/auth/permissions';
import { Client } from '../../setup/client';
import { makeCompany, makeCustomer, makeJob, uniqueEmail, type TestCompany } from '../../setup/factory';
import { apiRoutes, type ApiRoute, type Method } from '../../setup/routes';
import { BILLING_FIXTURES } from '../../setup/invoices';
import { BIDS_FIXTURES } from '../../setup/bids';
import { COSTS_FIXTURES } from '../../setup/costs';
import { MARGINS_FIXTURES } from '../../setup/margins';
import { AUTH_CALLERS, AUTH_PROBES, allowedKeys, betterAuthEndpoints, freshSession, type AuthCaller } from '../../setup/auth-routes';

/**
 * Every API route × every role, plus signed out and a member of another company, against
 * the role × action table. Routes are read from src/pages/api, so a new one cannot be
 * forgotten: one that takes ids needs an entry in FIXTURES, one without a declared access
 * needs an entry in UNDECLARED.
 */
type Params = Record<string, string>;
interface Fixture {
  /** The ids to put in the path; called again for each request that changes data. */
  params: (co: TestCompany) => Promise<Params>;
}

const FIXTURES: Record<string, Fixture> = {
  ...BILLING_FIXTURES,
  ...BIDS_FIXTURES,
  ...COSTS_FIXTURES,
  ...MARGINS_FIXTURES,
  '/api/jobs/[id]': { params: async (co) => ({ id: String(await assignedJob(co)) }) },
  '/api/customers/[id]': { params: async (co) => ({ id: String((await makeCustomer(co.owner)).id) }) },
  '/api/members/[id]': {
    params: async (co) => {
      const email = uniqueEmail('probe');
      const { joinAs } = await import('../../setup/factory');
      await joinAs(co.owner, co.id, 'crew_lead', email);
      const list = await co.owner.get('/api/members');
      return { id: list.body.members.find((m: { email: string }) => m.email === email).memberId };
    },
  },
  '/api/members/invitations/[id]': {
    params: async (co) => ({ id: (await co.owner.post('/api/members/invitations', { email: uniqueEmail('inv'), role: 'estimator' })).body.id }),
  },
};

/** Routes that are not declared with route(), and why. They are checked by their own tests. */
const UNDECLARED: Record<string, string> = {
  '/api/health': 'public health check (tests/api/health-and-schema.test.ts)',
  '/api/auth/[...all]': "better-auth's own routes: the allow-list is checked below ('better-auth's endpoints')",
  '/api/[...rest]': 'JSON 404 for unknown API paths',
  '/api/stripe/webhook': 'signed by Stripe; verified by signature (webhook tests)',
};

async function assignedJob(co: TestCompany): Promise<number> {
  const customer = await makeCustomer(co.owner);
  return (await makeJob(co.owner, customer.id, { crewLeadUserId: co.userIds.crew_lead })).id;
}

/** Keys that carry wages, margins or costs; a crew lead's answers hold none with a value. */
const MONEY_KEY = /wage|margin|markup|burden|unit_?cost|cost_?cents|costs?$|contract|price|amount/i;
function moneyKeys(body: unknown, path = ''): string[] {
  if (!body || typeof body !== 'object') return [];
  const out: string[] = [];
  for (const [k, v] of Object.entries(body as Record<string, unknown>)) {
    const here = path ? `${path}.${k}` : k;
    if (MONEY_KEY.test(k) && v !== null && v !== undefined) out.push(here);
    out.push(...moneyKeys(v, here));
  }
  return out;
}

const MUTATING = new Set<Method>(['POST', 'PUT', 'PATCH', 'DELETE']);

function fill(pattern: string, params: Params): string {
  return pattern.replace(/\[(\w+)\]/g, (_, k: string) => encodeURIComponent(params[k] ?? 'missing'));
}

async function call(client: Client, method: Method, path: string) {
  if (method === 'GET') return client.get(path);
  // A body no strict schema accepts: an allowed caller gets 400 and nothing changes.
  return client.request(method, path, { json: { __matrixProbe: true } });
}

let a: TestCompany;
let b: TestCompany;
let routes: ApiRoute[];

beforeAll(async () => {
  [a, b] = await Promise.all([makeCompany(), makeCompany()]);
  routes = await apiRoutes();
}, 180_000);

describe('permissions matrix', () => {
  it('has a fixture for every route with ids and a declaration for every handler', () => {
    for (const r of routes) {
      const undeclared = r.methods.filter((m) => m.access === null);
      if (undeclared.length) expect(UNDECLARED[r.pattern], `${r.pattern} has handlers without route(): declare them or list it in UNDECLARED`).toBeTruthy();
      if (/\[\w+\]/.test(r.pattern) && !UNDECLARED[r.pattern]) expect(FIXTURES[r.pattern], `${r.pattern} takes ids: add it to FIXTURES`).toBeTruthy();
    }
  });

  it('answers every route as the role × action table says', async () => {
    const rows: string[] = [];
    let checks = 0;
    const mismatches: string[] = [];
    const signedOut = new Client();
    for (const r of routes) {
      if (UNDECLARED[r.pattern]) continue;
      const hasIds = /\[\w+\]/.test(r.pattern);
      for (const { method, access, strictBody } of r.methods) {
        if (!access) continue;
        const given = FIXTURES[r.pattern];
        const fixture: Fixture | undefined = given && {
          params: (co) => given.params(co).catch((e: Error) => { throw new Error(`fixture for ${r.pattern}: ${e.message}`); }),
        };
        let shared: Params = hasIds ? await fixture!.params(a) : {};
        const pathFor = async () => (hasIds && MUTATING.has(method) ? fill(r.pattern, await fixture!.params(a)) : fill(r.pattern, shared));
        const expectStatus = (who: string, status: number, allowed: boolean | 'public', want404 = false) => {
          checks++;
          let ok: boolean;
          if (want404) ok = status === 404;
          else if (allowed === 'public' || allowed) ok = status !== 401 && status !== 403 && status < 500;
          else ok = who === 'signed out' ? status === 401 : status === 403;
          if (!ok) mismatches.push(`${method} ${r.pattern} as ${who}: got ${status}`);
        };
        // Another company's member first. For company A's ids the answer must be the one a
        // made-up id gets (404, or 400 for the probe body before any lookup): nothing learned.
        if (access !== 'public') {
          const ownerMay = access === 'signed-in' || can('owner', access as Action);
          if (hasIds && ownerMay) {
            const real = await call(b.owner, method, await pathFor());
            const guessed = await call(b.owner, method, fill(r.pattern, Object.fromEntries(Object.keys(shared).map((k) => [k, '987654321']))));
            checks++;
            if (real.status !== guessed.status || real.text !== guessed.text || ![400, 404].includes(real.status)) {
              mismatches.push(`${method} ${r.pattern} as member of another company: ${real.status} ${real.text.slice(0, 80)} vs made-up id ${guessed.status}`);
            }
            if (method === 'GET') expectStatus('member of another company', real.status, true, true);
          } else {
            const res = await call(b.owner, method, fill(r.pattern, shared));
            expectStatus('member of another company', res.status, ownerMay);
          }
        }
        for (const role of ROLES as readonly Role[]) {
          const allowed = access === 'public' || access === 'signed-in' || can(role, access as Action);
          const res = await call(a.as(role), method, allowed ? await pathFor() : fill(r.pattern, shared));
          expectStatus(role, res.status, allowed);
          // A declared body is a strict schema: the probe's unknown field is refused with 400.
          if (allowed && strictBody && MUTATING.has(method) && res.status !== 400) mismatches.push(`${method} ${r.pattern} as ${role} accepted an unknown field (${res.status})`);
          if (role === 'crew_lead' && method === 'GET' && res.status === 200) {
            const leaked = moneyKeys(res.body);
            if (leaked.length) mismatches.push(`GET ${r.pattern} shows a crew lead ${leaked.join(', ')}`);
          }
        }
        const res = await call(signedOut, method, fill(r.pattern, shared));
        expectStatus('signed out', res.status, access === 'public' ? 'public' : false);
        rows.push(`${method.padEnd(6)} ${r.pattern} (${access})`);
        shared = {};
      }
    }
    console.log(`permissions matrix: ${rows.length} route methods × 6 callers = ${checks} checks, ${mismatches.length} mismatches`);
    expect(mismatches).toEqual([]);
  }, 600_000);
});

describe("better-auth's endpoints", () => {
  const clientFor = (caller: AuthCaller): Client =>
    caller === 'signed out' ? new Client() : caller === 'member of another company' ? b.owner : a.as(caller);

  it('reach only the allow-list, each answering every caller as expected; every other path is a JSON 404', async () => {
    const endpoints = betterAuthEndpoints();
    const allowed = new Set(allowedKeys());
    expect(Object.keys(AUTH_PROBES).sort()).toEqual([...allowed].sort());
    const mismatches: string[] = [];
    let checks = 0;
    let closed = 0;
    for (const ep of endpoints) {
      for (const method of ep.methods) {
        const key = `${method} ${ep.path}`;
        const url = `/api/auth${ep.path.replace(/:\w+/g, 'madeUp123')}`;
        for (const caller of AUTH_CALLERS) {
          checks++;
          if (allowed.has(key)) {
            const p = AUTH_PROBES[key];
            const c = p.ownSession ? await freshSession(caller, a, b) : clientFor(caller);
            const r = await p.send(c, a);
            if (r.status !== p.expect(caller)) mismatches.push(`${key} as ${caller}: got ${r.status}, want ${p.expect(caller)}`);
          } else {
            const c = clientFor(caller);
            const r = method === 'GET' ? await c.get(url) : await c.request(method, url, { json: { organizationId: a.id, __matrixProbe: true } });
            if (r.status !== 404 || (r.body as { error?: { code?: string } })?.error?.code !== 'NOT_FOUND') mismatches.push(`${key} as ${caller}: got ${r.status} ${r.text.slice(0, 80)}`);
          }
        }
        if (!allowed.has(key)) closed++;
      }
    }
    // Every allowed route is one better-auth really serves (a renamed one would otherwise hide).
    for (const key of allowed) {
      const [method, path] = key.split(' ');
      if (!endpoints.some((e) => e.path === path && e.methods.includes(method))) mismatches.push(`${key} is allowed but better-auth has no such endpoint`);
    }
    // Other methods on allowed paths, and paths better-auth does not know, are 404 too.
    for (const [method, path] of [['GET', '/sign-in/email'], ['DELETE', '/sign-out'], ['PUT', '/organization/accept-invitation'], ['GET', '/nothing-here'], ['POST', '/sign-in/email/']]) {
      checks++;
      const r = await a.owner.request(method, `/api/auth${path}`, method === 'GET' ? {} : { json: {} });
      if (r.status !== 404) mismatches.push(`${method} ${path}: got ${r.status}`);
    }
    console.log(`better-auth endpoints: ${allowed.size} allowed, ${closed} closed (404) × ${AUTH_CALLERS.length} callers = ${checks} checks, ${mismatches.length} mismatches`);
    expect(mismatches).toEqual([]);
  }, 600_000);
});
