import { z } from 'zod';
import { patchOf } from '../patch.ts';
import { TIME_TASKS, type TimeTask } from './tasks.ts';
import { centsField, dateField, hoursField, idField, idList, optionalDate, optionalText, page, pageSize } from '../costs/fields.ts';
import { MAX_ENTRY_HOURS } from '../csv/normalise.ts';

/** Highest wage the form takes: $500 an hour. */
export const MAX_WAGE_CENTS = 50_000;

export const workerInput = z.strictObject({
  name: z.string().trim().min(1, 'Give the worker’s name.').max(160),
  wageCents: centsField('wage').refine((v) => v > 0 && v <= MAX_WAGE_CENTS, 'An hourly wage between $0.01 and $500.00.'),
  crewLeadUserId: z.string().max(36).nullish().transform((v) => (v ? v : null)),
  active: z.boolean().default(true),
  notes: optionalText(2000),
});
export type WorkerInput = z.output<typeof workerInput>;
export const workerPatch = patchOf(workerInput);

export interface Worker {
  id: number;
  name: string;
  wageCents: number;
  crewLeadUserId: string | null;
  crewLeadName: string | null;
  active: boolean;
  notes: string | null;
  hoursLogged: number;
}

/** What a crew lead's picker shows: names only, never wages. */
export interface WorkerOption {
  id: number;
  name: string;
  mine: boolean;
}

/** One entry, or the same job, day and task for several workers at once (the crew's day). */
export const timeEntryInput = z
  .strictObject({
    jobId: idField('Choose the job.'),
    date: dateField,
    task: z.enum(TIME_TASKS, { message: 'Choose the task.' }),
    notes: optionalText(500),
    workers: z
      .array(z.strictObject({ workerId: idField('Choose the worker.'), hours: hoursField(MAX_ENTRY_HOURS) }))
      .min(1, 'Add at least one worker with hours.')
      .max(30),
  })
  .refine((v) => new Set(v.workers.map((w) => w.workerId)).size === v.workers.length, { path: ['workers'], message: 'Each worker once per entry.' });
export type TimeEntryInput = z.output<typeof timeEntryInput>;

export const timeEntryPatch = z.strictObject({
  jobId: idField('Choose the job.').optional(),
  workerId: idField('Choose the worker.').optional(),
  date: dateField.optional(),
  task: z.enum(TIME_TASKS).optional(),
  hours: hoursField(MAX_ENTRY_HOURS).optional(),
  notes: optionalText(500),
});
export type TimeEntryPatch = z.output<typeof timeEntryPatch>;

export const timeListQuery = z.strictObject({
  job: idList,
  worker: idList,
  task: z
    .string()
    .optional()
    .transform((v) => (v ? v.split(',').filter(Boolean) : []))
    .pipe(z.array(z.enum(TIME_TASKS))),
  from: optionalDate,
  to: optionalDate,
  page,
  pageSize: pageSize(500, 50),
});
export type TimeListQuery = z.output<typeof timeListQuery>;

export interface TimeEntry {
  id: number;
  jobId: number;
  jobCode: string;
  workerId: number;
  workerName: string;
  date: string;
  hours: number;
  task: TimeTask;
  notes: string | null;
  /** Absent for a crew lead. */
  wageCents?: number;
  costCents?: number;
}

/** What the phone form needs: the jobs this person may log on and who can be on the crew. */
export interface TimeOptions {
  jobs: { id: number; code: string; title: string; status: string }[];
  workers: WorkerOption[];
  tasks: { value: string; label: string }[];
}
