import { z } from 'zod';
import { layoutInput } from '../takeoff/input.ts';
import { recipeSchema, type Recipe } from '../takeoff/recipe.ts';
import { computeTakeoff, type Takeoff, type TakeoffFailure } from '../takeoff/takeoff.ts';
import { ratesSchema, type Rates } from '../takeoff/rates.ts';
import type { SiteRules } from '../takeoff/input.ts';
import { extraLine, lineOverride, priceTakeoff, pricingTarget, type PriceItem, type Pricing, type PricingSettings } from '../pricing/price.ts';

export const BID_STATUSES = ['draft', 'sent', 'accepted', 'declined', 'superseded'] as const;
export type BidStatus = (typeof BID_STATUSES)[number];
export const BID_STATUS_LABELS: Record<BidStatus, string> = {
  draft: 'Draft', sent: 'Sent', accepted: 'Accepted', declined: 'Declined', superseded: 'Replaced',
};

export const DEFAULT_TERMS =
  'Price good for 30 days. A deposit is due on acceptance and the balance on completion. Work starts after the utility locate is complete and any permit is issued.';
export const DEFAULT_EXCLUSIONS =
  'Removal of an existing fence, rock or concrete met while digging, grading, surveys and permit fees unless listed above; repairs to unmarked private lines (irrigation, lighting, pet fence wire).';

const text = (max: number) => z.string().trim().max(max, `At most ${max} characters.`);

/** What the bid builder saves: geometry, style, extra lines, overrides and the price target. */
export const bidInput = layoutInput.extend({
  styleId: z.number({ message: 'Choose a fence style.' }).int().positive('Choose a fence style.'),
  title: text(200).default(''),
  extras: z.array(extraLine).max(30).default([]),
  overrides: z.array(lineOverride).max(200).default([]),
  target: pricingTarget,
  scope: text(4000).default(''),
  terms: text(4000).default(DEFAULT_TERMS),
  exclusions: text(4000).default(DEFAULT_EXCLUSIONS),
});
export type BidInput = z.output<typeof bidInput>;

/** POST /api/takeoff: runs and gates with a saved style or a whole recipe inline. */
export const takeoffRequest = layoutInput.extend({
  styleId: z.number().int().positive().optional(),
  recipe: recipeSchema.optional(),
  /** labour rates to use: a saved style's current rates when left out; required with an inline recipe, which has none of its own */
  rates: ratesSchema.optional(),
}).refine((r) => (r.styleId === undefined) !== (r.recipe === undefined), { path: ['styleId'], message: 'Give either styleId or a recipe, not both.' })
  .refine((r) => r.recipe === undefined || r.rates !== undefined, { path: ['rates'], message: 'Give the labour rates with an inline recipe; only a saved style has rates of its own.' });

export const bidPatch = z.strictObject({
  status: z.enum(['draft', 'sent', 'declined']).optional(),
  title: text(200).optional(),
});

export interface BidComputation {
  takeoff: Takeoff;
  pricing: Pricing;
}

/** The one computation the builder runs as the estimator types and the server runs to save. */
export function computeBid(
  input: Pick<BidInput, 'runs' | 'gates' | 'closed' | 'extras' | 'overrides' | 'target'>,
  recipe: Recipe,
  rates: Rates,
  site: SiteRules,
  book: ReadonlyMap<string, PriceItem>,
  settings: PricingSettings,
): BidComputation | TakeoffFailure {
  const takeoff = computeTakeoff({ runs: input.runs, gates: input.gates, closed: input.closed }, recipe, rates, site);
  if (!takeoff.ok) return takeoff;
  return { takeoff, pricing: priceTakeoff(takeoff, book, rates, settings, input.target, input.extras, input.overrides) };
}
