import { z } from 'zod';
import { isTimeZone } from '../format.ts';

export const TAX_MODES = ['none', 'materials', 'all'] as const;
export const TAX_MODE_LABELS: Record<(typeof TAX_MODES)[number], string> = {
  none: 'No sales tax on invoices (tax paid at purchase)',
  materials: 'Sales tax on materials only',
  all: 'Sales tax on the whole invoice',
};

const inches = z.union([z.number(), z.string()]).nullish()
  .transform((v) => (v === '' || v === null || v === undefined ? null : Number(v)))
  .refine((v) => v === null || (Number.isFinite(v) && v >= 0 && v <= 144), 'Inches from 0 to 144, or leave it empty.');
const isoDay = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use dates such as 2026-12-25.').refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v), 'Not a calendar date.');

/** The office's clock: what "today" is for due dates, aging, reminders and the locate ticket. */
export const TIME_ZONES: readonly (readonly [string, string])[] = [
  ['America/New_York', 'Eastern'],
  ['America/Chicago', 'Central'],
  ['America/Denver', 'Mountain'],
  ['America/Phoenix', 'Mountain, no daylight saving (Arizona)'],
  ['America/Los_Angeles', 'Pacific'],
  ['America/Anchorage', 'Alaska'],
  ['Pacific/Honolulu', 'Hawaii'],
  ['America/Regina', 'Central, no daylight saving (Saskatchewan)'],
  ['America/Halifax', 'Atlantic'],
  ['America/St_Johns', 'Newfoundland'],
];

export const LOCATE_BASES = ['business', 'calendar'] as const;

const pct = (max: number) => z.coerce.number().min(0, 'Cannot be negative.').max(max, `At most ${max} %.`);

export const settingsInput = z.strictObject({
  currency: z.enum(['USD', 'CAD'], { message: 'Choose USD or CAD.' }),
  paymentTermsDays: z.coerce.number().int().min(0).max(120),
  targetMarginPct: pct(90),
  labourBurdenPct: pct(200),
  /** job costing flags a category running more than this percent over its estimate */
  costFlagPct: pct(500),
  taxMode: z.enum(TAX_MODES),
  taxRatePct: pct(25),
  bidRoundingCents: z.coerce.number().int().min(1).max(100_000),
  timezone: z.string().trim().max(64).refine(isTimeZone, 'Choose a time zone.'),
  addressLine: z.string().trim().max(255).nullable().optional(),
  city: z.string().trim().max(120).nullable().optional(),
  region: z.string().trim().max(60).nullable().optional(),
  postalCode: z.string().trim().max(20).nullable().optional(),
  phone: z.string().trim().max(40).nullable().optional(),
  email: z.string().trim().max(255).nullable().optional(),
  licenseNumber: z.string().trim().max(60).nullable().optional(),
  /** inches; embedment is at least this when set */
  frostDepthIn: inches,
  /** inches: the tallest fence built without a permit, per yard position */
  permitMaxFrontIn: inches,
  permitMaxSideIn: inches,
  permitMaxBackIn: inches,
  locateWaitBusinessDays: z.coerce.number().int('Whole days.').min(0).max(20),
  locateValidDays: z.coerce.number().int('Whole days.').min(1).max(120),
  locateValidBasis: z.enum(LOCATE_BASES),
  /** 0 = Sunday … 6 = Saturday */
  businessDays: z.array(z.number().int().min(0).max(6)).min(1, 'Choose at least one business day.').max(7),
  holidays: z.array(isoDay).max(60, "At most 60 holidays."),
});
export type SettingsInput = z.output<typeof settingsInput>;

export interface CompanySettings extends SettingsInput {
  organizationId: string;
  companyName: string;
}
