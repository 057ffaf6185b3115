import { auth } from '../auth/auth.ts';
import { db } from '../db.ts';
import { AppError } from '../../lib/errors.ts';
import { ensureSettings } from '../repos/settings.ts';
import { seedCompanyDefaults } from './company-defaults.ts';

function slugify(name: string): string {
  const base = name.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'company';
  return `${base}-${Math.random().toString(36).slice(2, 8)}`;
}

/** Creates a company through better-auth (the caller becomes owner) with its settings row. */
export async function createCompany(headers: Headers, name: string): Promise<{ id: string; name: string }> {
  let org;
  try {
    org = await auth().api.createOrganization({ headers, body: { name, slug: slugify(name) } });
  } catch (err) {
    const e = err as { body?: { message?: string }; message?: string };
    throw new AppError('RULE_BROKEN', e.body?.message ?? e.message ?? 'The company could not be created.');
  }
  if (!org) throw new AppError('RULE_BROKEN', 'The company could not be created.');
  await ensureSettings(org.id);
  await seedCompanyDefaults(db(), org.id);
  await auth().api.setActiveOrganization({ headers, body: { organizationId: org.id } });
  return { id: org.id, name: org.name };
}

/** Switches the session's company, only to one the person belongs to. */
export async function switchCompany(headers: Headers, userId: string, organizationId: string): Promise<void> {
  const member = await db()('member').where({ userId, organizationId }).first('id');
  if (!member) throw new AppError('NOT_FOUND', 'That company was not found.');
  await auth().api.setActiveOrganization({ headers, body: { organizationId } });
}
