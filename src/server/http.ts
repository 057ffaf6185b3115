import type { APIContext, APIRoute } from 'astro';
import { z } from 'zod';
import { AppError, ERROR_STATUS, fieldErrors, type ErrorCode, type FieldErrors } from '../lib/errors.ts';
import { can, type Action, type Role } from '../lib/auth/permissions.ts';
import { env } from './env.ts';
import { databaseUp } from './db.ts';
import { bumpDataVersion } from './report-cache.ts';

/** Who is asking, in which company: the first argument of every service. */
export interface Actor {
  companyId: string;
  userId: string;
  role: Role;
  /** The company's data version as the request began, when the session read gave it (report cache). */
  dataVersion?: number;
}

export function json(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(data), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function errorResponse(code: ErrorCode, message: string, fields?: FieldErrors): Response {
  return json({ error: { code, message, ...(fields ? { fields } : {}) } }, ERROR_STATUS[code]);
}

const DOWN_CODES = ['ECONNREFUSED', 'PROTOCOL_CONNECTION_LOST', 'ETIMEDOUT', 'ECONNRESET', 'EPIPE', 'ER_SERVER_SHUTDOWN', 'ER_CON_COUNT_ERROR', 'ECONNABORTED'];
const DOWN_MESSAGE = /Knex: Timeout acquiring a connection|connect ECONNREFUSED|Connection lost|closed state|server has gone away|shutdown in progress/i;

/**
 * True for the errors mysql2, Knex and better-auth (which wraps them) raise when MariaDB
 * cannot be reached; follows the cause chain.
 */
export function isDbDown(err: unknown): boolean {
  for (let e = err, depth = 0; e && depth < 6; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: string }).code ?? '';
    const msg = e instanceof Error ? e.message : typeof e === 'string' ? e : '';
    if (DOWN_CODES.includes(code) || DOWN_MESSAGE.test(msg)) return true;
  }
  return false;
}

export async function handleError(err: unknown): Promise<Response> {
  if (err instanceof AppError) return errorResponse(err.code, err.message, err.fields);
  if (isDbDown(err) || !(await databaseUp())) return errorResponse('DB_DOWN', 'The database is not reachable right now. Try again in a moment.');
  const code = (err as { code?: string } | null)?.code;
  if (code === 'ER_DUP_ENTRY') return errorResponse('CONFLICT', 'That record already exists.');
  console.error('[api] unexpected error', err);
  return errorResponse('INTERNAL', 'Something went wrong on our side. It has been logged.');
}

export type Access = Action | 'signed-in' | 'public';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

interface RouteDef<B extends z.ZodType | undefined, Q extends z.ZodType | undefined> {
  /** The permission checked before the body is read. */
  access: Access;
  body?: B;
  query?: Q;
  /** Largest body accepted, in bytes (default MAX_BODY_BYTES). */
  maxBytes?: number;
  status?: number;
  handle: (a: {
    ctx: APIContext;
    actor: Actor;
    body: B extends z.ZodType ? z.infer<B> : undefined;
    query: Q extends z.ZodType ? z.infer<Q> : undefined;
    params: Record<string, string | undefined>;
  }) => Promise<unknown>;
}

/** Reads a JSON body with a size limit, refusing other content types. */
export async function readJson(request: Request, maxBytes: number): Promise<unknown> {
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/json\b/i.test(type)) {
    throw new AppError('UNSUPPORTED_MEDIA_TYPE', 'Send the body as application/json.');
  }
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > maxBytes) throw new AppError('PAYLOAD_TOO_LARGE', `The body is larger than ${maxBytes} bytes.`);
  const reader = request.body?.getReader();
  if (!reader) return undefined;
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > maxBytes) {
      await reader.cancel();
      throw new AppError('PAYLOAD_TOO_LARGE', `The body is larger than ${maxBytes} bytes.`);
    }
    chunks.push(value);
  }
  const text = new TextDecoder('utf-8', { fatal: false }).decode(Buffer.concat(chunks));
  if (!text.trim()) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError('BAD_JSON', 'The body is not valid JSON.');
  }
}

function queryObject(url: URL): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of url.searchParams) out[k] = v;
  return out;
}

/** The actor for a signed-in member of a company, or the error to answer with. */
export function actorOf(ctx: APIContext, access: Access): Actor | AppError {
  const { user, company, role } = ctx.locals;
  if (access === 'public') return { companyId: company?.id ?? '', userId: user?.id ?? '', role: role ?? 'crew_lead' };
  if (!user) return new AppError('UNAUTHENTICATED', 'Sign in first.');
  if (access === 'signed-in') return { companyId: company?.id ?? '', userId: user.id, role: role ?? 'crew_lead' };
  if (!company || !role) return new AppError('NO_COMPANY', 'Choose or create a company first.');
  if (!can(role, access)) return new AppError('FORBIDDEN', 'Your role may not do that.');
  return { companyId: company.id, userId: user.id, role, ...(ctx.locals.dataVersion === null ? {} : { dataVersion: ctx.locals.dataVersion }) };
}

/**
 * An endpoint as a declaration: who may call it, the shape of its body and query, and one
 * service call. Permission is checked before the body is read, so a crew lead posting to
 * a route it may not use gets 403 whatever it sent.
 */
export type DeclaredRoute = APIRoute & { access: Access; strictBody: boolean };

export function route<B extends z.ZodType | undefined = undefined, Q extends z.ZodType | undefined = undefined>(def: RouteDef<B, Q>): DeclaredRoute {
  // The access travels with the handler, so the permission-matrix test can read every
  // endpoint's declaration and check the server answers it.
  return Object.assign(async (ctx: APIContext) => {
    let changedCompany = '';
    try {
      const actor = actorOf(ctx, def.access);
      if (actor instanceof AppError) throw actor;
      let query: unknown = undefined;
      if (def.query) {
        const parsed = def.query.safeParse(queryObject(ctx.url));
        if (!parsed.success) throw new AppError('BAD_INPUT', 'Some query parameters are not valid.', fieldErrors(parsed.error.issues));
        query = parsed.data;
      }
      let body: unknown = undefined;
      if (def.body) {
        const raw = await readJson(ctx.request, def.maxBytes ?? env().MAX_BODY_BYTES);
        const parsed = def.body.safeParse(raw ?? {});
        if (!parsed.success) throw new AppError('BAD_INPUT', 'Some fields need attention.', fieldErrors(parsed.error.issues));
        body = parsed.data;
      }
      // A write may change what the reports show: raise the company's data version once the
      // handler is done (its transaction committed, or rolled back, either way).
      if (!SAFE_METHODS.has(ctx.request.method)) changedCompany = actor.companyId;
      const result = await def.handle({
        ctx,
        actor,
        body: body as never,
        query: query as never,
        params: ctx.params as Record<string, string | undefined>,
      });
      if (result instanceof Response) return result;
      if (result === undefined) return new Response(null, { status: 204 });
      return json(result, def.status ?? 200);
    } catch (err) {
      return handleError(err);
    } finally {
      if (changedCompany) await bumpDataVersion(changedCompany).catch(() => undefined);
    }
  }, { access: def.access, strictBody: Boolean(def.body) });
}

/** A positive integer id from a route parameter, or a 404 (never a 500 for '/jobs/abc'). */
export function idParam(value: string | undefined, what = 'That record'): number {
  const n = Number(value);
  if (!value || !/^\d{1,15}$/.test(value) || !Number.isSafeInteger(n) || n <= 0) throw new AppError('NOT_FOUND', `${what} was not found.`);
  return n;
}
