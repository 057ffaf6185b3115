import { z } from 'zod';
import { patchOf } from '../patch.ts';

/** The life of a job, in the trade's words; the order is the usual order. */
export const JOB_STATUSES = ['lead', 'measured', 'bid_sent', 'won', 'lost', 'building', 'completed', 'closed'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

export const JOB_STATUS_LABELS: Record<JobStatus, string> = {
  lead: 'Lead',
  measured: 'Site measured',
  bid_sent: 'Bid sent',
  won: 'Won',
  lost: 'Lost',
  building: 'Building',
  completed: 'Completed',
  closed: 'Closed',
};

/** J-0142: a letter prefix, a dash and digits. */
export const JOB_CODE = /^[A-Z]{1,4}-\d{1,6}$/;

// Every optional field takes a string, null or nothing and gives a string or null, so a
// parsed value parses again to itself (the browser sends what it validated).
const optionalText = (max: number) =>
  z.string().trim().max(max, `At most ${max} characters.`).nullish().transform((v) => (v ? v : null));
const optionalDate = z
  .string()
  .trim()
  .nullish()
  .transform((v) => (v ? v : null))
  .refine((v) => v === null || (/^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`))), 'Use a date such as 2026-05-14.');
const optionalId = z
  .union([z.number(), z.string()])
  .nullish()
  .transform((v) => (v === undefined || v === null || v === '' ? null : Number(v)))
  .refine((v) => v === null || (Number.isSafeInteger(v) && v > 0), 'Choose one from the list.');
const optionalUser = z
  .string()
  .max(36)
  .nullish()
  .transform((v) => (v ? v : null));

/** A job as the form and the API take it; the same schema runs in the browser. */
export const jobInput = z.strictObject({
  code: z
    .string()
    .trim()
    .toUpperCase()
    .nullish()
    .transform((v) => (v ? v : null))
    .refine((v) => v === null || JOB_CODE.test(v), 'Use a code such as J-0142, or leave it empty for the next number.'),
  title: z.string().trim().min(1, 'Give the job a short title, e.g. "Back yard privacy fence".').max(200, 'At most 200 characters.'),
  customerId: z
    .union([z.number(), z.string()])
    .transform((v) => (v === '' ? NaN : Number(v)))
    .refine((v) => Number.isSafeInteger(v) && v > 0, 'Choose the customer.'),
  fenceStyleId: optionalId,
  status: z.enum(JOB_STATUSES, { message: 'Choose a status from the list.' }).default('lead'),
  commercial: z.boolean().default(false),
  estimatorUserId: optionalUser,
  crewLeadUserId: optionalUser,
  siteLine1: optionalText(200),
  siteCity: optionalText(120),
  siteRegion: optionalText(60),
  sitePostal: optionalText(20),
  leadDate: optionalDate,
  measureDate: optionalDate,
  bidDate: optionalDate,
  decidedDate: optionalDate,
  startDate: optionalDate,
  completedDate: optionalDate,
  closedDate: optionalDate,
  notes: optionalText(8000),
});
export type JobInput = z.output<typeof jobInput>;
export const jobPatch = patchOf(jobInput);

export const JOB_SORTS = ['code', 'title', 'customer', 'style', 'status', 'leadDate', 'updatedAt', 'contract'] as const;

export const jobListQuery = z.strictObject({
  q: z.string().trim().max(100).optional(),
  status: z
    .string()
    .optional()
    .transform((v) => (v ? v.split(',').filter(Boolean) : []))
    .pipe(z.array(z.enum(JOB_STATUSES))),
  style: z
    .string()
    .optional()
    .transform((v) => (v ? v.split(',').filter(Boolean).map(Number) : []))
    .pipe(z.array(z.number().int().positive())),
  customer: z.coerce.number().int().positive().optional(),
  sort: z.enum(JOB_SORTS).default('code'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  page: z.coerce.number().int().min(1).max(100000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});
export type JobListQuery = z.output<typeof jobListQuery>;

export interface JobRow {
  id: number;
  code: string;
  title: string;
  status: JobStatus;
  customerId: number;
  customerName: string;
  fenceStyleId: number | null;
  styleName: string | null;
  estimatorName: string | null;
  crewLeadName: string | null;
  leadDate: string | null;
  startDate: string | null;
  /** Hidden (null) for roles that may not see prices. */
  contractCents: number | null;
  updatedAt: string;
}

export interface Job extends JobRow {
  commercial: boolean;
  estimatorUserId: string | null;
  crewLeadUserId: string | null;
  siteLine1: string | null;
  siteCity: string | null;
  siteRegion: string | null;
  sitePostal: string | null;
  measureDate: string | null;
  bidDate: string | null;
  decidedDate: string | null;
  completedDate: string | null;
  closedDate: string | null;
  notes: string | null;
  createdAt: string;
}

/** Formats the next job code from a counter: 142 → J-0142. */
export function formatJobCode(n: number, prefix = 'J'): string {
  return `${prefix}-${String(n).padStart(4, '0')}`;
}
