import { z } from 'zod';
import { JOB_STATUS_LABELS, type JobStatus } from '../jobs/schema.ts';

/**
 * The filters every margin report takes, on screen, in its endpoint and in its CSV export:
 * a date range (on each job's report date: completed, else started, else won), fence
 * styles, estimators and job statuses. Lists travel as comma-separated query values.
 */

/** Statuses that have a contract, so a margin. */
export const REPORT_STATUSES = ['won', 'building', 'completed', 'closed'] as const satisfies readonly JobStatus[];
export type ReportStatus = (typeof REPORT_STATUSES)[number];
export const REPORT_STATUS_LABELS: Record<ReportStatus, string> = Object.fromEntries(REPORT_STATUSES.map((s) => [s, JOB_STATUS_LABELS[s]])) as Record<ReportStatus, string>;

const ISO = /^\d{4}-\d{2}-\d{2}$/;
const optionalDate = z
  .string()
  .trim()
  .optional()
  .transform((v) => (v ? v : undefined))
  .refine((v) => v === undefined || (ISO.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v)), 'Use a date such as 2026-05-14.');

const commaList = z
  .string()
  .optional()
  .transform((v) => (v ?? '').split(',').map((s) => s.trim()).filter(Boolean));

const idList = commaList.refine((xs) => xs.length <= 50 && xs.every((x) => /^\d{1,15}$/.test(x) && Number(x) > 0), 'Choose styles from the list.').transform((xs) => [...new Set(xs.map(Number))]);
const userList = commaList.refine((xs) => xs.length <= 50 && xs.every((x) => /^[\w-]{1,36}$/.test(x)), 'Choose estimators from the list.').transform((xs) => [...new Set(xs)]);

function statusList<S extends string>(allowed: readonly S[], dflt: readonly S[]) {
  return commaList
    .refine((xs) => xs.every((x) => (allowed as readonly string[]).includes(x)), `Use ${allowed.join(', ')}.`)
    .transform((xs) => (xs.length ? [...new Set(xs)] : [...dflt]) as S[]);
}

function filterSchema<S extends string>(allowed: readonly S[], dflt: readonly S[]) {
  return z
    .strictObject({
      from: optionalDate,
      to: optionalDate,
      style: idList,
      estimator: userList,
      status: statusList(allowed, dflt),
      format: z.enum(['json', 'csv']).default('json'),
    })
    .refine((f) => !f.from || !f.to || f.from <= f.to, { path: ['to'], message: 'The end of the range is before its start.' });
}

/** Margin reports: finished jobs unless asked otherwise. */
export const reportFilter = filterSchema(REPORT_STATUSES, ['completed', 'closed']);
export type ReportFilter = z.output<typeof reportFilter>;

/** Work in progress: the open jobs. */
export const WIP_FILTER_STATUSES = ['won', 'building'] as const;
export const wipFilter = filterSchema(WIP_FILTER_STATUSES, WIP_FILTER_STATUSES);
export type WipFilter = z.output<typeof wipFilter>;

/** A filter back as query parameters (empty values left out), for links and exports. */
export function filterParams(f: { from?: string; to?: string; style?: number[]; estimator?: string[]; status?: string[] }, extra: Record<string, string> = {}): URLSearchParams {
  const p = new URLSearchParams();
  if (f.from) p.set('from', f.from);
  if (f.to) p.set('to', f.to);
  if (f.style?.length) p.set('style', f.style.join(','));
  if (f.estimator?.length) p.set('estimator', f.estimator.join(','));
  if (f.status?.length) p.set('status', f.status.join(','));
  for (const [k, v] of Object.entries(extra)) p.set(k, v);
  return p;
}
