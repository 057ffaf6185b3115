import { randomBytes, randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { AppError } from '../../lib/errors.ts';
import { ensureSettings } from '../repos/settings.ts';
import { seedCompanyDefaults } from './company-defaults.ts';

type Q = Knex | Knex.Transaction;

function slugify(name: string): string {
  const base = name.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'company';
  return `${base}-${randomBytes(4).toString('hex')}`;
}

/** Remembers the company a person is working in, so their next sign-in lands there. */
export async function rememberCompany(q: Q, userId: string, organizationId: string): Promise<void> {
  await q('user_last_company')
    .insert({ user_id: userId, organization_id: organizationId, updated_at: q.fn.now(3) })
    .onConflict('user_id')
    .merge(['organization_id', 'updated_at']);
}

/**
 * A new company with the person as its owner, its settings row and starting styles and
 * rates, all in one transaction: a company never exists without them. (better-auth's own
 * organization/create is closed; see src/pages/api/auth/[...all].ts.)
 */
export async function createCompany(userId: string, name: string): Promise<{ id: string; name: string }> {
  const id = randomUUID();
  await db().transaction(async (trx) => {
    const now = new Date();
    await trx('organization').insert({ id, name, slug: slugify(name), createdAt: now });
    await trx('member').insert({ id: randomUUID(), organizationId: id, userId, role: 'owner', createdAt: now });
    await ensureSettings(id, trx);
    await seedCompanyDefaults(trx, id);
    await rememberCompany(trx, userId, id);
  });
  return { id, name };
}

/** Makes a company the session's active one. */
async function activate(sessionId: string, organizationId: string): Promise<void> {
  await db()('session').where('id', sessionId).update({ activeOrganizationId: organizationId });
}

/** createCompany for a signed-in person, who then works in it. */
export async function createCompanyInSession(userId: string, sessionId: string, name: string): Promise<{ id: string; name: string }> {
  const company = await createCompany(userId, name);
  await activate(sessionId, company.id);
  return company;
}

/** Switches the session's company, only to one the person belongs to, and remembers it. */
export async function switchCompany(userId: string, sessionId: string, organizationId: string): Promise<void> {
  const member = await db()('member').where({ userId, organizationId }).first('id');
  if (!member) throw new AppError('NOT_FOUND', 'That company was not found.');
  await activate(sessionId, organizationId);
  await rememberCompany(db(), userId, organizationId);
}
