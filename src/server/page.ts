import type { AstroGlobal } from 'astro';
import { can, type Action } from '../lib/auth/permissions.ts';
import { AppError } from '../lib/errors.ts';
import type { Actor } from './http.ts';

/** The actor for a page, or null when the role may not open it (the page then rewrites to /forbidden). */
export function pageActor(astro: AstroGlobal, action: Action): Actor | null {
  const { user, company, role, dataVersion } = astro.locals;
  if (!user || !company || !role || !can(role, action)) return null;
  return { companyId: company.id, userId: user.id, role, ...(dataVersion === null ? {} : { dataVersion }) };
}

/** Runs a service call for a page; a missing or foreign record becomes the 404 page. */
export async function orNotFound<T>(fn: () => Promise<T>): Promise<T | null> {
  try {
    return await fn();
  } catch (err) {
    if (err instanceof AppError && err.code === 'NOT_FOUND') return null;
    throw err;
  }
}

/** A route parameter as a positive id, or null. */
export function pageId(value: string | undefined): number | null {
  if (!value || !/^\d{1,15}$/.test(value)) return null;
  const n = Number(value);
  return Number.isSafeInteger(n) && n > 0 ? n : null;
}
