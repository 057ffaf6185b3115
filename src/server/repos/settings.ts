import type { Knex } from 'knex';
import { db } from '../db.ts';
import type { CompanySettings, SettingsInput } from '../../lib/settings/schema.ts';

type Q = Knex | Knex.Transaction;

const COLUMNS: Record<keyof SettingsInput, string> = {
  currency: 'currency',
  paymentTermsDays: 'payment_terms_days',
  targetMarginPct: 'target_margin_pct',
  labourBurdenPct: 'labour_burden_pct',
  costFlagPct: 'cost_flag_pct',
  taxMode: 'tax_mode',
  taxRatePct: 'tax_rate_pct',
  bidRoundingCents: 'bid_rounding_cents',
  timezone: 'timezone',
  addressLine: 'address_line',
  city: 'city',
  region: 'region',
  postalCode: 'postal_code',
  phone: 'phone',
  email: 'email',
  licenseNumber: 'license_number',
  frostDepthIn: 'frost_depth_in',
  permitMaxFrontIn: 'permit_max_front_in',
  permitMaxSideIn: 'permit_max_side_in',
  permitMaxBackIn: 'permit_max_back_in',
  locateWaitBusinessDays: 'locate_wait_business_days',
  locateValidDays: 'locate_valid_days',
  locateValidBasis: 'locate_valid_basis',
  businessDays: 'business_days',
  holidays: 'holidays',
};
const NUMERIC = new Set(['targetMarginPct', 'labourBurdenPct', 'costFlagPct', 'taxRatePct']);
const NULLABLE_NUMERIC = new Set(['frostDepthIn', 'permitMaxFrontIn', 'permitMaxSideIn', 'permitMaxBackIn']);

function fromColumn(key: string, v: unknown): unknown {
  if (NUMERIC.has(key)) return Number(v);
  if (NULLABLE_NUMERIC.has(key)) return v == null ? null : Number(v);
  if (key === 'businessDays') return String(v ?? '1,2,3,4,5').split(',').filter(Boolean).map(Number);
  if (key === 'holidays') return v ? (JSON.parse(String(v)) as string[]) : [];
  return v ?? null;
}

function toColumn(key: string, v: unknown): unknown {
  if (key === 'businessDays') return [...new Set(v as number[])].sort().join(',');
  if (key === 'holidays') return JSON.stringify([...new Set(v as string[])].sort());
  return v;
}

export async function getSettings(companyId: string, q: Q = db()): Promise<CompanySettings> {
  const r = await q('company_settings as s')
    .join('organization as o', 'o.id', 's.organization_id')
    .where('s.organization_id', companyId)
    .first('s.*', 'o.name as company_name');
  if (!r) throw new Error(`company ${companyId} has no settings row`);
  const out: Record<string, unknown> = { organizationId: companyId, companyName: r.company_name };
  for (const [key, col] of Object.entries(COLUMNS)) out[key] = fromColumn(key, r[col]);
  return out as unknown as CompanySettings;
}

export async function ensureSettings(companyId: string, q: Q = db()): Promise<void> {
  await q('company_settings').insert({ organization_id: companyId }).onConflict('organization_id').ignore();
}

export async function updateSettings(companyId: string, input: Partial<SettingsInput>, q: Q = db()): Promise<void> {
  const row: Record<string, unknown> = {};
  for (const [key, col] of Object.entries(COLUMNS)) if (key in input) row[col] = toColumn(key, (input as Record<string, unknown>)[key]);
  await q('company_settings').where('organization_id', companyId).update({ ...row, updated_at: q.fn.now(3) });
}
