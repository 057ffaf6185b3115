import { z } from 'zod';

/**
 * Labour productivity and crew rates, one value per kind and style. Hours are crew-hours
 * (the whole crew working); man-hours = crew-hours × crew size.
 */
export const RATE_KINDS = ['hole_hours', 'post_set_hours', 'rails_infill_hours_per_ft', 'gate_hours', 'setup_hours', 'crew_size', 'crew_wage_cents', 'rental_day_hours'] as const;
export type RateKind = (typeof RATE_KINDS)[number];
export type Rates = Record<RateKind, number>;

export const RATE_INFO: Record<RateKind, { label: string; unit: string; min: number; max: number; integer?: boolean }> = {
  hole_hours: { label: 'Dig a hole', unit: 'crew-h per hole', min: 0, max: 8 },
  post_set_hours: { label: 'Set a post (plumb, fill and brace)', unit: 'crew-h per post', min: 0, max: 8 },
  rails_infill_hours_per_ft: { label: 'Rails and infill', unit: 'crew-h per ft of fence', min: 0, max: 4 },
  gate_hours: { label: 'Build and hang a gate', unit: 'crew-h per gate', min: 0, max: 40 },
  setup_hours: { label: 'Set-up and clean-up', unit: 'crew-h per job', min: 0, max: 80 },
  crew_size: { label: 'Crew size', unit: 'people', min: 1, max: 12, integer: true },
  crew_wage_cents: { label: 'Crew wage', unit: 'cents per person-hour', min: 0, max: 50_000, integer: true },
  rental_day_hours: { label: 'Hours in a rental day', unit: 'h', min: 1, max: 24 },
};

export const ratesSchema = z.strictObject(
  Object.fromEntries(RATE_KINDS.map((k) => {
    const i = RATE_INFO[k];
    let s = z.number({ message: 'Enter a number.' }).min(i.min, `At least ${i.min}.`).max(i.max, `At most ${i.max}.`);
    if (i.integer) s = s.int('Use a whole number.');
    return [k, s];
  })) as Record<RateKind, z.ZodNumber>,
);

/** Labour tasks as bids store them and calibration compares them. */
export const LABOUR_TASKS = ['posts', 'rails_infill', 'gates', 'setup'] as const;
export type LabourTask = (typeof LABOUR_TASKS)[number];
export const LABOUR_TASK_LABELS: Record<LabourTask, string> = {
  posts: 'Dig holes and set posts',
  rails_infill: 'Rails and infill',
  gates: 'Gates',
  setup: 'Set-up and clean-up',
};
