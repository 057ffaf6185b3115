import type { Knex } from 'knex';
import { todayIn as todayInZone } from '../../lib/bids/rules.ts';
import { db, toInt } from '../db.ts';
import { parseSchedule } from '../../lib/reminders/index.ts';
import type { BillingSettingsInput } from '../../lib/billing/schema.ts';
import type { TaxMode } from '../../lib/billing/invoice.ts';
import type { CurrencyCode } from '../../lib/format.ts';

type Q = Knex | Knex.Transaction;

export interface BillingSettings extends BillingSettingsInput {
  companyName: string;
  currency: CurrencyCode;
  taxMode: TaxMode;
  taxRatePct: number;
  timezone: string;
  address: string[];
  phone: string | null;
  email: string | null;
  licenseNumber: string | null;
  schedule: number[];
}

export async function billingSettings(companyId: string, q: Q = db()): Promise<BillingSettings> {
  const r = await q('company_settings as s').join('organization as o', 'o.id', 's.organization_id').where('s.organization_id', companyId).first('s.*', 'o.name as company_name');
  if (!r) throw new Error(`company ${companyId} has no settings row`);
  return {
    companyName: r.company_name,
    currency: r.currency as CurrencyCode,
    taxMode: r.tax_mode as TaxMode,
    taxRatePct: Number(r.tax_rate_pct),
    timezone: r.timezone || 'UTC',
    address: [r.address_line, [r.city, [r.region, r.postal_code].filter(Boolean).join(' ')].filter(Boolean).join(', ')].filter(Boolean),
    phone: r.phone ?? null,
    email: r.email ?? null,
    licenseNumber: r.license_number ?? null,
    depositCapPct: r.deposit_cap_pct == null ? null : Number(r.deposit_cap_pct),
    depositCapCents: r.deposit_cap_cents == null ? null : toInt(r.deposit_cap_cents),
    defaultRetainagePct: Number(r.default_retainage_pct),
    paymentTermsDays: Number(r.payment_terms_days),
    invoicePrefix: r.invoice_prefix,
    remindersEnabled: Boolean(r.reminders_enabled),
    reminderOffsets: r.reminder_offsets,
    schedule: parseSchedule(r.reminder_offsets) ?? [],
  };
}

export async function updateBillingSettings(companyId: string, v: BillingSettingsInput, q: Q = db()): Promise<void> {
  await q('company_settings').where('organization_id', companyId).update({
    deposit_cap_pct: v.depositCapPct,
    deposit_cap_cents: v.depositCapCents,
    default_retainage_pct: v.defaultRetainagePct,
    payment_terms_days: v.paymentTermsDays,
    invoice_prefix: v.invoicePrefix,
    reminders_enabled: v.remindersEnabled,
    reminder_offsets: (parseSchedule(v.reminderOffsets) ?? []).join(','),
    updated_at: q.fn.now(3),
  });
}

/** Companies whose reminders are on, with their schedule and time zone. */
export async function companiesWithReminders(q: Q = db()): Promise<{ companyId: string; timezone: string; schedule: number[] }[]> {
  const rows = await q('company_settings').where('reminders_enabled', true).select('organization_id', 'timezone', 'reminder_offsets');
  return rows.map((r) => ({ companyId: r.organization_id, timezone: r.timezone || 'UTC', schedule: parseSchedule(r.reminder_offsets) ?? [] })).filter((c) => c.schedule.length > 0);
}

/** Today's date where the company works ('YYYY-MM-DD'). */
export function todayIn(timezone: string, now = new Date()): string {
  return todayInZone(timezone, now);
}
