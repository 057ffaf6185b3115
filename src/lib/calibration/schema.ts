import { z } from 'zod';

/** An item of a style's calibration: a labour task, a material group, or the rental-day rate. */
export const ITEM_KEY = /^(labour:(posts|rails_infill|gates|setup)|waste:(posts|rails|infill|cap|concrete|gravel|hardware|gates)|rental:day_hours)$/;

const reason = z.string().trim().min(5, 'Say why (at least 5 characters).').max(500, 'At most 500 characters.');

export const calibrationQuery = z.strictObject({
  /** Weight recent jobs more: a job's weight halves every this many days; empty counts every job alike. */
  halfLifeDays: z
    .string()
    .optional()
    .transform((v) => (v ? Number(v) : undefined))
    .refine((v) => v === undefined || (Number.isInteger(v) && v >= 30 && v <= 3650), 'Use whole days from 30 to 3650.'),
});

export const applyInput = z.strictObject({
  styleId: z.number({ message: 'Choose a style.' }).int().positive(),
  /** The suggestions as the estimator saw them: the server applies them only if they still stand. */
  items: z.array(z.strictObject({ key: z.string().regex(ITEM_KEY, 'Not a calibration item.'), suggested: z.number() })).min(1, 'Choose at least one suggestion.').max(12),
  reason,
  halfLifeDays: z.number().int().min(30).max(3650).nullish(),
});
export type ApplyInput = z.output<typeof applyInput>;

export const exclusionInput = z.strictObject({
  jobId: z.number({ message: 'Choose a job.' }).int().positive(),
  /** 'job' for the whole job, or one item's key. */
  scope: z.string().refine((s) => s === 'job' || ITEM_KEY.test(s), 'Leave out the whole job or one item.'),
  reason,
});
