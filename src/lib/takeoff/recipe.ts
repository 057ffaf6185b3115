import { z } from 'zod';
import { patchOf } from '../patch.ts';

/**
 * A fence style's recipe: what a bay, a post, a hole and a gate are made of. Lengths carry
 * their unit in the field name (…Ft, …In); skus point at price-book items.
 */

const num = (min: number, max: number, what = 'This') =>
  z.number({ message: `${what} must be a number.` }).min(min, `At least ${min}.`).max(max, `At most ${max}.`);
const sku = z.string().trim().min(1, 'Give the price-book item code.').max(80);
const label = z.string().trim().min(1, 'Give it a name.').max(120);

const stockLength = z.strictObject({ lengthFt: num(1, 40), sku });
/** Nominal size of lumber, for board feet (a 4×4 is 4 × 4 nominal). */
const nominal = z.strictObject({ thicknessIn: num(0.25, 12), widthIn: num(0.5, 16) });

export const postSpec = z.strictObject({
  label,
  shape: z.enum(['square', 'round']),
  /** Actual width (square) or outside diameter (round), inches. */
  widthIn: num(0.5, 12),
  nominal: nominal.nullable(),
  stock: z.array(stockLength).min(1, 'Add at least one stock length.').max(8),
});
export type PostSpec = z.output<typeof postSpec>;

export const embedmentRule = z.discriminatedUnion('rule', [
  /** A share of the post's whole length goes in the ground. */
  z.strictObject({ rule: z.literal('fraction_of_length'), fraction: num(0.1, 0.6) }),
  /** A share of the height above grade goes in the ground. */
  z.strictObject({ rule: z.literal('fraction_of_height'), fraction: num(0.1, 1.5) }),
  z.strictObject({ rule: z.literal('fixed_depth'), depthIn: num(6, 72) }),
  /**
   * A base depth plus so much for each foot of height over a threshold, a part of a foot
   * counting as a foot (the deeper reading): ASTM F567's chain-link posts are 24 in plus 3 in per
   * foot over 4 ft.
   */
  z.strictObject({ rule: z.literal('depth_plus_per_ft'), baseIn: num(6, 72), perFtIn: num(0, 24), overHeightIn: num(0, 144) }),
  /** Posts cut from one stock length in equal pieces (a 10 ft post in halves); depth is what is left below grade. */
  z.strictObject({ rule: z.literal('stock_split'), stockFt: num(4, 24), pieces: z.number().int().min(1).max(4) }),
]);
export type EmbedmentRule = z.output<typeof embedmentRule>;

const railCount = z.strictObject({ maxHeightIn: num(6, 144), count: z.number().int().min(0).max(8) });

export const railsSpec = z.strictObject({
  label,
  /** per_bay: cut to the bay from stock; continuous: run the fence length in sticks; each: sold one per bay. */
  mode: z.enum(['per_bay', 'continuous', 'each']),
  byHeight: z.array(railCount).min(1).max(8),
  nominal: nominal.nullable(),
  stock: z.array(stockLength).min(1).max(8),
});

export const infillSpec = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('pickets'), label, sku, widthIn: num(0.5, 12), gapIn: num(0, 12), lengthFt: num(1, 16) }),
  /** Panels one per bay (prefab), or cut from longer panels (cuttable welded wire). */
  z.strictObject({ kind: z.literal('panels'), label, sku, widthFt: num(1, 20), heightIn: num(12, 120), cuttable: z.boolean() }),
  /** Fabric sold in rolls of one length and several heights; each run takes the lowest roll at least as high as the fence. */
  z.strictObject({
    kind: z.literal('roll'),
    rollLengthFt: num(5, 500),
    rolls: z.array(z.strictObject({ heightIn: num(12, 144), label, sku })).min(1, 'Add at least one roll height.').max(12),
  }),
  z.strictObject({ kind: z.literal('none') }),
]);
export type InfillSpec = z.output<typeof infillSpec>;

export const HARDWARE_PER = ['bay', 'gate', 'terminal_post', 'post', 'foot', 'job'] as const;
export const HARDWARE_PER_LABELS: Record<(typeof HARDWARE_PER)[number], string> = {
  bay: 'per bay', gate: 'per gate', terminal_post: 'per end, corner or gate post', post: 'per post', foot: 'per foot of fence', job: 'per job',
};

export const gateSpec = z.strictObject({ label, sku, maxWidthFt: num(1, 40) });

export const WASTE_KEYS = ['posts', 'rails', 'infill', 'cap', 'concrete', 'gravel', 'hardware', 'gates'] as const;
export type WasteKey = (typeof WASTE_KEYS)[number];

export const GRAVEL_BASES = ['below_embedment', 'within_embedment'] as const;
export type GravelBase = (typeof GRAVEL_BASES)[number];
export const GRAVEL_BASE_LABELS: Record<GravelBase, string> = {
  below_embedment: 'Under the post (hole = embedment + gravel)',
  within_embedment: "Around the post's foot (hole = embedment)",
};

const recipeObject = z.strictObject({
  heightMinIn: num(12, 144),
  heightMaxIn: num(12, 144),
  /** Most a bay may span, post centre to post centre. */
  spacingFt: num(2, 16),
  /** Least a bay may span before the infill no longer fits. */
  minBayFt: num(0.5, 16),
  kerfIn: num(0, 0.5),
  posts: z.strictObject({ line: postSpec, terminal: postSpec.nullable(), gate: postSpec.nullable() }),
  embedment: embedmentRule,
  /** Embedment never less than this, inches. */
  minEmbedmentIn: num(0, 72),
  hole: z.strictObject({
    /** A fixed auger size, inches; null takes diameterFactor × the post's width. */
    diameterIn: num(2, 36).nullable(),
    diameterFactor: num(1, 6),
    gravelDepthIn: num(0, 12),
    /**
     * Where the gravel base sits. below_embedment: under the post's buried length (hole depth =
     * embedment + gravel; the post stands on the gravel). within_embedment: around the post's
     * foot, inside the buried length (hole depth = embedment; concrete over the rest), as the
     * trade words the "posts cut from 10 ft stock in halves bury about 18 in, including a 3–4 in
     * gravel base" rule (common practice, no source).
     */
    gravelBase: z.enum(GRAVEL_BASES),
    concrete: z.strictObject({ label, sku, bagLb: num(10, 100), bagYieldCuFt: num(0.05, 1.5) }).nullable(),
    gravel: z.strictObject({ label, sku, bagCuFt: num(0.1, 2) }).nullable(),
  }),
  rails: railsSpec.nullable(),
  infill: infillSpec,
  cap: z.strictObject({ label, nominal: nominal.nullable(), stock: z.array(stockLength).min(1).max(8) }).nullable(),
  hardware: z.array(z.strictObject({ label, sku, per: z.enum(HARDWARE_PER), qty: num(0, 1000) })).max(20),
  gates: z.strictObject({ single: gateSpec, double: gateSpec.nullable() }),
  /** Extra bought over the takeoff, percent, by material group. */
  wastePct: z.strictObject(Object.fromEntries(WASTE_KEYS.map((k) => [k, num(0, 50)])) as Record<WasteKey, z.ZodNumber>),
  rentals: z.array(z.strictObject({ label, covers: z.enum(['dig']), daySku: sku, halfDaySku: sku.nullable() })).max(4),
}).superRefine((r, ctx) => {
  if (r.heightMaxIn < r.heightMinIn) ctx.addIssue({ code: 'custom', path: ['heightMaxIn'], message: 'The tallest height is below the lowest.' });
  if (r.minBayFt > r.spacingFt) ctx.addIssue({ code: 'custom', path: ['minBayFt'], message: 'The shortest bay is longer than the post spacing.' });
  if (r.infill.kind === 'panels' && !r.infill.cuttable && r.infill.widthFt < r.minBayFt)
    ctx.addIssue({ code: 'custom', path: ['infill', 'widthFt'], message: 'The panel is narrower than the shortest bay.' });
});

/**
 * Recipes saved before a field existed read as they meant then, so stored styles and the
 * recipes kept on saved bids keep working: a missing gravelBase is within the embedment for
 * posts cut from stock (the trade states that rule with the gravel inside the buried length)
 * and below it for every other rule; a roll infill with one item code and no height becomes
 * one roll as high as the tallest fence the style builds, which is what it was bought as.
 */
export function upgradeRecipe(raw: unknown): unknown {
  if (!raw || typeof raw !== 'object' || Array.isArray(raw)) return raw;
  let r = raw as Record<string, any>;
  const hole = r.hole;
  if (hole && typeof hole === 'object' && !Array.isArray(hole) && !('gravelBase' in hole))
    r = { ...r, hole: { ...hole, gravelBase: r.embedment?.rule === 'stock_split' ? 'within_embedment' : 'below_embedment' } };
  const inf = r.infill;
  if (inf && typeof inf === 'object' && inf.kind === 'roll' && !('rolls' in inf) && 'sku' in inf) {
    const { sku: itemSku, label: itemLabel, ...rest } = inf;
    r = { ...r, infill: { ...rest, rolls: [{ heightIn: r.heightMaxIn, label: itemLabel, sku: itemSku }] } };
  }
  return r;
}

export const recipeSchema = z.preprocess(upgradeRecipe, recipeObject);
export type Recipe = z.output<typeof recipeObject>;

/** Every price-book sku a recipe refers to, with the name it uses for it. */
export function recipeSkus(r: Recipe): { sku: string; label: string }[] {
  const out: { sku: string; label: string }[] = [];
  const post = (p: PostSpec | null) => p?.stock.forEach((s) => out.push({ sku: s.sku, label: `${p.label} ${s.lengthFt} ft` }));
  post(r.posts.line); post(r.posts.terminal); post(r.posts.gate);
  r.rails?.stock.forEach((s) => out.push({ sku: s.sku, label: `${r.rails!.label} ${s.lengthFt} ft` }));
  r.cap?.stock.forEach((s) => out.push({ sku: s.sku, label: `${r.cap!.label} ${s.lengthFt} ft` }));
  if (r.infill.kind === 'roll') r.infill.rolls.forEach((x) => out.push({ sku: x.sku, label: x.label }));
  else if (r.infill.kind !== 'none') out.push({ sku: r.infill.sku, label: r.infill.label });
  if (r.hole.concrete) out.push({ sku: r.hole.concrete.sku, label: r.hole.concrete.label });
  if (r.hole.gravel) out.push({ sku: r.hole.gravel.sku, label: r.hole.gravel.label });
  r.hardware.forEach((h) => out.push({ sku: h.sku, label: h.label }));
  out.push({ sku: r.gates.single.sku, label: r.gates.single.label });
  if (r.gates.double) out.push({ sku: r.gates.double.sku, label: r.gates.double.label });
  r.rentals.forEach((x) => { out.push({ sku: x.daySku, label: `${x.label}, day` }); if (x.halfDaySku) out.push({ sku: x.halfDaySku, label: `${x.label}, half day` }); });
  const seen = new Set<string>();
  return out.filter((x) => (seen.has(x.sku) ? false : (seen.add(x.sku), true)));
}

export const STYLE_KINDS = ['wood_privacy', 'split_rail', 'wire_panel', 'chain_link', 'vinyl', 'ornamental', 'picket'] as const;
export const STYLE_KIND_LABELS: Record<(typeof STYLE_KINDS)[number], string> = {
  wood_privacy: 'Wood privacy', split_rail: 'Split rail', wire_panel: 'Wire panel in timber frame', chain_link: 'Chain link',
  vinyl: 'Vinyl', ornamental: 'Ornamental steel', picket: 'Wood picket',
};

export const styleInput = z.strictObject({
  name: z.string().trim().min(1, 'Name the style.').max(120, 'At most 120 characters.'),
  kind: z.enum(STYLE_KINDS, { message: 'Choose a kind.' }),
  description: z.string().trim().max(2000).nullish().transform((v) => (v ? v : null)),
  active: z.boolean().default(true),
  recipe: recipeSchema,
});
export const stylePatch = patchOf(styleInput);
