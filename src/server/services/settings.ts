import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import type { CompanySettings, SettingsInput } from '../../lib/settings/schema.ts';
import { can } from '../../lib/auth/permissions.ts';
import * as settings from '../repos/settings.ts';
import { audit } from '../repos/audit.ts';

/** Margins, burden, the cost flag and tax are for the roles that price work; a crew lead gets the rest. */
export async function getSettings(actor: Actor): Promise<Partial<CompanySettings>> {
  const all = await settings.getSettings(actor.companyId);
  if (can(actor.role, 'bids:read')) return all;
  const { targetMarginPct: _m, labourBurdenPct: _b, costFlagPct: _f, taxRatePct: _t, bidRoundingCents: _r, ...rest } = all;
  return rest;
}

export async function updateSettings(actor: Actor, input: Partial<SettingsInput>) {
  await db().transaction(async (trx) => {
    await settings.updateSettings(actor.companyId, input, trx);
    await audit(trx, actor, 'settings', actor.companyId, 'update', input);
  });
  return settings.getSettings(actor.companyId);
}
