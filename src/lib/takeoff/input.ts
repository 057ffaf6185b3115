import { z } from 'zod';

export const YARD_POSITIONS = ['front', 'side', 'back'] as const;
export type YardPosition = (typeof YARD_POSITIONS)[number];
export const YARD_LABELS: Record<YardPosition, string> = { front: 'Front yard', side: 'Side yard', back: 'Back yard' };

const feet = (what: string, max: number) =>
  z.number({ message: `Enter the ${what} in feet.` }).gt(0, `The ${what} must be more than 0 ft.`).max(max, `At most ${max} ft.`);

/** A straight stretch of fence. */
export const runInput = z.strictObject({
  label: z.string().trim().max(60).default(''),
  lengthFt: feet('length', 2000),
  /** Height above grade, inches. */
  heightIn: z.number({ message: 'Enter the height in inches.' }).gt(0, 'The height must be more than 0 in.').max(240, 'At most 240 in.'),
  /** Compass-free direction for the sketch: 0 = to the right, 90 = up the page. */
  headingDeg: z.number().min(-360).max(360).default(0),
  /** This run starts at the end of the run before it and shares that post (a corner). */
  connectsToPrevious: z.boolean().default(false),
  yard: z.enum(['front', 'side', 'back']).default('back'),
});
export type RunInput = z.output<typeof runInput>;

export const gateInput = z.strictObject({
  runIndex: z.number().int('Choose a run.').min(0, 'Choose a run.'),
  widthFt: feet('gate width', 40),
  kind: z.enum(['single', 'double']).default('single'),
  /** Feet from the run's start to the gate's near post; null centres it. */
  offsetFt: z.number().min(0, 'Cannot be negative.').nullable().default(null),
});
export type GateInput = z.output<typeof gateInput>;

export const layoutInput = z.strictObject({
  runs: z.array(runInput).min(1, 'Add at least one run.').max(60, 'At most 60 runs.'),
  gates: z.array(gateInput).max(30, 'At most 30 gates.').default([]),
  /** The last run ends on the first run's first post (an enclosure). */
  closed: z.boolean().default(false),
});
export type LayoutInput = z.output<typeof layoutInput>;

/** What the company's settings add to a takeoff. */
export interface SiteRules {
  /** Local frost depth, inches; embedment is at least this when set. */
  frostDepthIn: number | null;
  /** Tallest fence built without a permit, inches, by yard position. */
  permitMaxHeightIn: Record<YardPosition, number | null>;
}

export const NO_SITE_RULES: SiteRules = { frostDepthIn: null, permitMaxHeightIn: { front: null, side: null, back: null } };
