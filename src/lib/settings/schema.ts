import { z } from 'zod';

export const TAX_MODES = ['none', 'materials', 'all'] as const;
export const TAX_MODE_LABELS: Record<(typeof TAX_MODES)[number], string> = {
  none: 'No sales tax on invoices (tax paid at purchase)',
  materials: 'Sales tax on materials only',
  all: 'Sales tax on the whole invoice',
};

const pct = (max: number) => z.coerce.number().min(0, 'Cannot be negative.').max(max, `At most ${max} %.`);

export const settingsInput = z.strictObject({
  currency: z.enum(['USD', 'CAD'], { message: 'Choose USD or CAD.' }),
  paymentTermsDays: z.coerce.number().int().min(0).max(120),
  targetMarginPct: pct(90),
  labourBurdenPct: pct(200),
  taxMode: z.enum(TAX_MODES),
  taxRatePct: pct(25),
  bidRoundingCents: z.coerce.number().int().min(1).max(100_000),
  addressLine: z.string().trim().max(255).nullable().optional(),
  city: z.string().trim().max(120).nullable().optional(),
  region: z.string().trim().max(60).nullable().optional(),
  postalCode: z.string().trim().max(20).nullable().optional(),
  phone: z.string().trim().max(40).nullable().optional(),
  email: z.string().trim().max(255).nullable().optional(),
  licenseNumber: z.string().trim().max(60).nullable().optional(),
});
export type SettingsInput = z.output<typeof settingsInput>;

export interface CompanySettings extends SettingsInput {
  organizationId: string;
  companyName: string;
}
