import { route } from '../../../server/http.ts';
import { billingSettingsInput } from '../../../lib/billing/schema.ts';
import { getBillingSettings, saveBillingSettings } from '../../../server/services/reminders.ts';

export const GET = route({ access: 'reminders:write', handle: ({ actor }) => getBillingSettings(actor) });
export const PUT = route({ access: 'reminders:write', body: billingSettingsInput, handle: ({ actor, body }) => saveBillingSettings(actor, body) });
