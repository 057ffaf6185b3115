import { db } from '../db.ts';
import type { Actor } from '../http.ts';
import type { SettingsInput } from '../../lib/settings/schema.ts';
import * as settings from '../repos/settings.ts';
import { audit } from '../repos/audit.ts';

export const getSettings = (actor: Actor) => settings.getSettings(actor.companyId);

export async function updateSettings(actor: Actor, input: Partial<SettingsInput>) {
  await db().transaction(async (trx) => {
    await settings.updateSettings(actor.companyId, input, trx);
    await audit(trx, actor, 'settings', actor.companyId, 'update', input);
  });
  return settings.getSettings(actor.companyId);
}
