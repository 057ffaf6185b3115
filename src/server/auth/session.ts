import { createHmac, timingSafeEqual } from 'node:crypto';
import { db } from '../db.ts';
import { auth } from './auth.ts';
import { env } from '../env.ts';
import { isRole, type Role } from '../../lib/auth/permissions.ts';

export interface Membership {
  organizationId: string;
  name: string;
  slug: string;
  role: Role;
}

export interface RequestIdentity {
  user: { id: string; name: string; email: string } | null;
  sessionId: string | null;
  company: { id: string; name: string; slug: string } | null;
  role: Role | null;
  memberships: Membership[];
  /** The active company's data version (report-cache.ts) as this request began; null when not read here. */
  dataVersion: number | null;
}

const nobody: RequestIdentity = { user: null, sessionId: null, company: null, role: null, memberships: [], dataVersion: null };

export async function membershipsOf(userId: string): Promise<Membership[]> {
  const rows = await db()('member as m')
    .join('organization as o', 'o.id', 'm.organizationId')
    .where('m.userId', userId)
    .orderBy('o.name')
    .select('m.organizationId', 'o.name', 'o.slug', 'm.role');
  return rows.filter((r) => isRole(r.role)) as Membership[];
}

interface CookieKeys { name: string; secret: string; expiresInMs: number; updateAgeMs: number }
let cookieKeys: Promise<CookieKeys> | undefined;

/** The session cookie's name and signing secret, and the session timings, as better-auth has them. */
function sessionCookieKeys(): Promise<CookieKeys> {
  cookieKeys ??= auth().$context.then((c) => ({
    name: c.authCookies.sessionToken.name,
    secret: c.secret,
    expiresInMs: c.sessionConfig.expiresIn * 1000,
    updateAgeMs: c.sessionConfig.updateAge * 1000,
  }));
  return cookieKeys;
}

/**
 * The session token from the signed cookie: null when there is no cookie, false when its
 * signature does not verify (HMAC-SHA256 under the auth secret, as better-auth signs it).
 */
function signedToken(cookieHeader: string | null, keys: CookieKeys): string | null | false {
  if (!cookieHeader) return null;
  for (const part of cookieHeader.split(';')) {
    const eq = part.indexOf('=');
    if (eq < 0 || part.slice(0, eq).trim() !== keys.name) continue;
    let value: string;
    try { value = decodeURIComponent(part.slice(eq + 1).trim()); } catch { return false; }
    const dot = value.lastIndexOf('.');
    if (dot < 1) return false;
    const token = value.slice(0, dot);
    const given = Buffer.from(value.slice(dot + 1), 'base64');
    const expected = createHmac('sha256', keys.secret).update(token).digest();
    return given.length === expected.length && timingSafeEqual(given, expected) ? token : false;
  }
  return null;
}

// Written out once rather than built per request: it runs on every request.
const SESSION_SQL = `SELECT s.id AS session_id, s.expiresAt AS expires_at, s.createdAt AS created_at, s.activeOrganizationId AS active_org,
       u.id AS user_id, u.name AS user_name, u.email, o.id AS org_id, o.name AS org_name, o.slug, m.role, v.version AS data_version,
       lc.organization_id AS last_org
  FROM session s JOIN \`user\` u ON u.id = s.userId
  LEFT JOIN user_last_company lc ON lc.user_id = u.id
  LEFT JOIN member m ON m.userId = u.id LEFT JOIN organization o ON o.id = m.organizationId
  LEFT JOIN company_data_versions v ON v.organization_id = o.id
 WHERE s.token = ? ORDER BY o.name`;

interface SessionRow {
  session_id: string; expires_at: Date; created_at: Date; active_org: string | null;
  user_id: string; user_name: string; email: string;
  org_id: string | null; org_name: string | null; slug: string | null; role: string | null; data_version: number | null;
  last_org: string | null;
}

/**
 * Who is asking. The session is the one better-auth keeps; membership and role are read fresh
 * from the member table on every request, so a member removed or demoted is refused on their
 * very next request in every open session. Sessions also have an absolute lifetime.
 *
 * A live session that is not due for better-auth's sliding refresh is read in one query
 * (session, user and memberships together) after checking the cookie's signature here; every
 * other case (no such session, expired, due for refresh) goes through better-auth itself.
 */
export async function identify(headers: Headers): Promise<RequestIdentity> {
  const keys = await sessionCookieKeys();
  const token = signedToken(headers.get('cookie'), keys);
  if (token === null || token === false) return nobody;
  const [rows] = (await db().raw(SESSION_SQL, [token])) as unknown as [SessionRow[]];
  const first = rows[0];
  const now = Date.now();
  const expires = first ? new Date(first.expires_at).getTime() : 0;
  if (!first || expires <= now || expires - keys.expiresInMs + keys.updateAgeMs <= now) return identifyThroughAuth(headers);
  const memberships = rows.filter((r) => r.org_id && isRole(r.role)).map((r) => ({ organizationId: r.org_id!, name: r.org_name!, slug: r.slug!, role: r.role as Role }));
  const who = await settle(
    { id: first.session_id, createdAt: first.created_at, activeOrganizationId: first.active_org },
    { id: first.user_id, name: first.user_name, email: first.email },
    memberships,
    first.last_org,
  );
  // The data version came with the memberships, so the report cache needs no query of its own.
  const active = who.company ? rows.find((r) => r.org_id === who.company!.id) : undefined;
  return { ...who, dataVersion: active ? Number(active.data_version ?? 0) : null };
}

/** better-auth's own reading of the session: clears an expired one, slides one due for refresh. */
async function identifyThroughAuth(headers: Headers): Promise<RequestIdentity> {
  const found = await auth().api.getSession({ headers });
  if (!found) return nobody;
  const { session, user } = found;
  return settle(
    { id: session.id, createdAt: session.createdAt, activeOrganizationId: (session as { activeOrganizationId?: string | null }).activeOrganizationId ?? null },
    { id: user.id, name: user.name, email: user.email },
    await membershipsOf(user.id),
    await lastCompanyOf(user.id),
  );
}

async function lastCompanyOf(userId: string): Promise<string | null> {
  const row = await db()('user_last_company').where('user_id', userId).first('organization_id');
  return row?.organization_id ?? null;
}

async function settle(
  session: { id: string; createdAt: Date | string; activeOrganizationId: string | null },
  user: { id: string; name: string; email: string },
  memberships: Membership[],
  lastCompany: string | null,
): Promise<RequestIdentity> {
  const createdAt = new Date(session.createdAt).getTime();
  if (Date.now() - createdAt > env().SESSION_MAX_AGE * 1000) {
    await db()('session').where('id', session.id).delete();
    return nobody;
  }
  const activeId = session.activeOrganizationId;
  let active = memberships.find((m) => m.organizationId === activeId) ?? null;
  if (!active && memberships.length > 0) {
    // A new session (just signed in), or removed from the company it had: the company the
    // person last worked in when they still belong to it, else their first by name; kept
    // on this session.
    active = memberships.find((m) => m.organizationId === lastCompany) ?? memberships[0];
    await db()('session').where('id', session.id).update({ activeOrganizationId: active.organizationId });
  } else if (!active && activeId) {
    await db()('session').where('id', session.id).update({ activeOrganizationId: null });
  }
  return {
    user,
    sessionId: session.id,
    company: active ? { id: active.organizationId, name: active.name, slug: active.slug } : null,
    role: active?.role ?? null,
    memberships,
    dataVersion: null,
  };
}
