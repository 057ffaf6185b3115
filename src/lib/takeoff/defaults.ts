import type { Recipe } from './recipe.ts';
import type { Rates } from './rates.ts';

/**
 * Starting recipes and labour rates for the styles most shops build. Spacings, depths,
 * waste and hours are common practice (no source) and the hours are starting values for
 * calibration to correct; companies edit both to their own practice.
 */

const WASTE = { posts: 5, rails: 10, infill: 10, cap: 10, concrete: 10, gravel: 10, hardware: 5, gates: 0 };
const CONCRETE_50 = { label: 'Packaged concrete 50 lb', sku: 'CONC-50', bagLb: 50, bagYieldCuFt: 0.375 };
const GRAVEL = { label: 'Drainage gravel 0.5 ft³ bag', sku: 'GRAVEL-05', bagCuFt: 0.5 };
const AUGER = [{ label: 'Earth auger', covers: 'dig' as const, daySku: 'RENT-AUGER-DAY', halfDaySku: 'RENT-AUGER-HALF' }];
const PT_4X4 = {
  label: '4×4 treated post', shape: 'square' as const, widthIn: 3.5, nominal: { thicknessIn: 4, widthIn: 4 },
  stock: [{ lengthFt: 8, sku: 'PT-4X4-08' }, { lengthFt: 10, sku: 'PT-4X4-10' }, { lengthFt: 12, sku: 'PT-4X4-12' }],
};
const PT_2X4 = [{ lengthFt: 8, sku: 'PT-2X4-08' }, { lengthFt: 10, sku: 'PT-2X4-10' }, { lengthFt: 12, sku: 'PT-2X4-12' }, { lengthFt: 16, sku: 'PT-2X4-16' }];

export const DEFAULT_RECIPES: Record<string, Recipe> = {
  wood_privacy: {
    heightMinIn: 48, heightMaxIn: 96, spacingFt: 8, minBayFt: 2, kerfIn: 0.125,
    posts: { line: PT_4X4, terminal: null, gate: null },
    embedment: { rule: 'fraction_of_length', fraction: 1 / 3 }, minEmbedmentIn: 24,
    hole: { diameterIn: null, diameterFactor: 3, gravelDepthIn: 4, gravelBase: 'below_embedment', concrete: CONCRETE_50, gravel: GRAVEL },
    rails: { label: '2×4 treated rail', mode: 'per_bay', byHeight: [{ maxHeightIn: 48, count: 2 }, { maxHeightIn: 72, count: 3 }, { maxHeightIn: 96, count: 4 }], nominal: { thicknessIn: 2, widthIn: 4 }, stock: PT_2X4 },
    infill: { kind: 'pickets', label: 'Cedar dog-ear picket 1×6 × 6 ft', sku: 'CED-PKT-1X6-6', widthIn: 5.5, gapIn: 0, lengthFt: 6 },
    cap: null,
    hardware: [{ label: 'Exterior screws, 5 lb box', sku: 'SCREW-EXT-5LB', per: 'foot', qty: 0.01 }],
    gates: { single: { label: 'Wood walk gate, built on site, with hinges and latch', sku: 'GATE-WOOD-4', maxWidthFt: 5 }, double: { label: 'Wood double drive gate with drop rod', sku: 'GATE-WOOD-DBL', maxWidthFt: 12 } },
    wastePct: WASTE, rentals: AUGER,
  },
  split_rail: {
    heightMinIn: 36, heightMaxIn: 54, spacingFt: 10, minBayFt: 3, kerfIn: 0.125,
    posts: { line: { label: 'Cedar split-rail post, 3-hole', shape: 'round', widthIn: 5.5, nominal: null, stock: [{ lengthFt: 7, sku: 'SR-POST-3H-7' }] }, terminal: null, gate: null },
    embedment: { rule: 'stock_split', stockFt: 7, pieces: 1 }, minEmbedmentIn: 24,
    hole: { diameterIn: null, diameterFactor: 2, gravelDepthIn: 4, gravelBase: 'within_embedment', concrete: null, gravel: GRAVEL },
    rails: { label: 'Cedar split rail', mode: 'each', byHeight: [{ maxHeightIn: 144, count: 3 }], nominal: null, stock: [{ lengthFt: 10, sku: 'SR-RAIL-10' }] },
    infill: { kind: 'none' }, cap: null, hardware: [],
    gates: { single: { label: 'Split-rail walk gate', sku: 'GATE-SR-4', maxWidthFt: 5 }, double: { label: 'Split-rail double gate', sku: 'GATE-SR-DBL', maxWidthFt: 12 } },
    wastePct: { ...WASTE, rails: 5 }, rentals: AUGER,
  },
  wire_panel: {
    heightMinIn: 36, heightMaxIn: 50, spacingFt: 8, minBayFt: 2, kerfIn: 0.125,
    posts: { line: PT_4X4, terminal: null, gate: null },
    embedment: { rule: 'stock_split', stockFt: 10, pieces: 2 }, minEmbedmentIn: 16,
    hole: { diameterIn: 6, diameterFactor: 3, gravelDepthIn: 4, gravelBase: 'within_embedment', concrete: CONCRETE_50, gravel: GRAVEL },
    rails: { label: '2×4 treated rail', mode: 'per_bay', byHeight: [{ maxHeightIn: 144, count: 2 }], nominal: { thicknessIn: 2, widthIn: 4 }, stock: PT_2X4 },
    infill: { kind: 'panels', label: 'Welded-wire panel 16 ft × 50 in', sku: 'WW-PANEL-16', widthFt: 16, heightIn: 50, cuttable: true },
    cap: { label: '2×6 treated cap board', nominal: { thicknessIn: 2, widthIn: 6 }, stock: [{ lengthFt: 8, sku: 'PT-2X6-08' }, { lengthFt: 12, sku: 'PT-2X6-12' }, { lengthFt: 16, sku: 'PT-2X6-16' }] },
    hardware: [{ label: 'Fence staples, 1 lb', sku: 'STAPLE-1LB', per: 'bay', qty: 0.25 }, { label: 'Exterior screws, 5 lb box', sku: 'SCREW-EXT-5LB', per: 'foot', qty: 0.005 }],
    gates: { single: { label: 'Wire-panel walk gate in a timber frame', sku: 'GATE-WW-4', maxWidthFt: 5 }, double: null },
    wastePct: WASTE, rentals: AUGER,
  },
  chain_link: {
    heightMinIn: 36, heightMaxIn: 72, spacingFt: 10, minBayFt: 1, kerfIn: 0.125,
    posts: {
      line: { label: 'Galvanized line post 1⅝ in', shape: 'round', widthIn: 1.66, nominal: null, stock: [{ lengthFt: 6, sku: 'CL-LINE-6' }, { lengthFt: 8, sku: 'CL-LINE-8' }, { lengthFt: 9, sku: 'CL-LINE-9' }] },
      terminal: { label: 'Galvanized terminal post 2⅜ in', shape: 'round', widthIn: 2.375, nominal: null, stock: [{ lengthFt: 7, sku: 'CL-TERM-7' }, { lengthFt: 9, sku: 'CL-TERM-9' }] },
      gate: null,
    },
    // ASTM F567 §5.1: at least 24 in, plus 3 in for each foot of height over 4 ft.
    embedment: { rule: 'depth_plus_per_ft', baseIn: 24, perFtIn: 3, overHeightIn: 48 }, minEmbedmentIn: 24,
    hole: { diameterIn: null, diameterFactor: 4, gravelDepthIn: 3, gravelBase: 'below_embedment', concrete: CONCRETE_50, gravel: GRAVEL },
    rails: { label: 'Galvanized top rail 1⅜ in', mode: 'continuous', byHeight: [{ maxHeightIn: 144, count: 1 }], nominal: null, stock: [{ lengthFt: 21, sku: 'CL-RAIL-21' }] },
    infill: {
      kind: 'roll', rollLengthFt: 50,
      rolls: [36, 42, 48, 60, 72].map((h) => ({ heightIn: h, label: `Chain-link fabric 11½ ga, ${h} in × 50 ft roll`, sku: `CL-FABRIC-${h}` })),
    },
    cap: null,
    hardware: [{ label: 'Terminal fittings (bands, tension bar, cap)', sku: 'CL-TERM-KIT', per: 'terminal_post', qty: 1 }, { label: 'Loop cap', sku: 'CL-LOOP-CAP', per: 'bay', qty: 1 }, { label: 'Fabric ties, bag of 100', sku: 'CL-TIES-100', per: 'foot', qty: 0.012 }],
    gates: { single: { label: 'Chain-link walk gate', sku: 'CL-GATE-4', maxWidthFt: 6 }, double: { label: 'Chain-link double drive gate', sku: 'CL-GATE-DBL', maxWidthFt: 16 } },
    wastePct: { ...WASTE, infill: 5 }, rentals: AUGER,
  },
  vinyl: {
    heightMinIn: 48, heightMaxIn: 72, spacingFt: 8, minBayFt: 2, kerfIn: 0.125,
    posts: { line: { label: 'Vinyl post 5×5', shape: 'square', widthIn: 5, nominal: null, stock: [{ lengthFt: 9, sku: 'VIN-POST-9' }] }, terminal: null, gate: null },
    embedment: { rule: 'fraction_of_length', fraction: 1 / 3 }, minEmbedmentIn: 24,
    hole: { diameterIn: 10, diameterFactor: 3, gravelDepthIn: 4, gravelBase: 'below_embedment', concrete: CONCRETE_50, gravel: GRAVEL },
    rails: null,
    infill: { kind: 'panels', label: 'Vinyl privacy panel 6 × 8 ft', sku: 'VIN-PANEL-6X8', widthFt: 8, heightIn: 72, cuttable: false },
    cap: null,
    hardware: [{ label: 'Vinyl post cap', sku: 'VIN-CAP', per: 'post', qty: 1 }],
    gates: { single: { label: 'Vinyl walk gate with hardware', sku: 'VIN-GATE-4', maxWidthFt: 5 }, double: { label: 'Vinyl double drive gate with hardware', sku: 'VIN-GATE-DBL', maxWidthFt: 12 } },
    wastePct: { ...WASTE, infill: 0 }, rentals: AUGER,
  },
  ornamental: {
    heightMinIn: 36, heightMaxIn: 60, spacingFt: 6, minBayFt: 1, kerfIn: 0.125,
    posts: { line: { label: 'Steel post 2 in square', shape: 'square', widthIn: 2, nominal: null, stock: [{ lengthFt: 6, sku: 'ORN-POST-6' }, { lengthFt: 8, sku: 'ORN-POST-8' }] }, terminal: null, gate: null },
    embedment: { rule: 'fixed_depth', depthIn: 24 }, minEmbedmentIn: 24,
    hole: { diameterIn: 8, diameterFactor: 3, gravelDepthIn: 3, gravelBase: 'below_embedment', concrete: CONCRETE_50, gravel: GRAVEL },
    rails: null,
    infill: { kind: 'panels', label: 'Steel panel 4 × 6 ft', sku: 'ORN-PANEL-4X6', widthFt: 6, heightIn: 48, cuttable: false },
    cap: null,
    hardware: [{ label: 'Panel bracket', sku: 'ORN-BRACKET', per: 'bay', qty: 4 }],
    gates: { single: { label: 'Steel walk gate, self-closing hinges', sku: 'ORN-GATE-4', maxWidthFt: 5 }, double: { label: 'Steel double drive gate', sku: 'ORN-GATE-DBL', maxWidthFt: 12 } },
    wastePct: { ...WASTE, infill: 0 }, rentals: AUGER,
  },
};

const base = { crew_size: 2, crew_wage_cents: 2800, rental_day_hours: 8, gate_hours: 1 };
export const DEFAULT_RATES: Record<string, Rates> = {
  wood_privacy: { ...base, hole_hours: 0.15, post_set_hours: 0.15, rails_infill_hours_per_ft: 0.05, setup_hours: 1.5 },
  split_rail: { ...base, hole_hours: 0.12, post_set_hours: 0.1, rails_infill_hours_per_ft: 0.015, setup_hours: 1 },
  wire_panel: { ...base, hole_hours: 0.1, post_set_hours: 0.12, rails_infill_hours_per_ft: 0.04, setup_hours: 1 },
  chain_link: { ...base, hole_hours: 0.1, post_set_hours: 0.12, rails_infill_hours_per_ft: 0.015, setup_hours: 1 },
  vinyl: { ...base, hole_hours: 0.15, post_set_hours: 0.15, rails_infill_hours_per_ft: 0.03, setup_hours: 1.5 },
  ornamental: { ...base, hole_hours: 0.1, post_set_hours: 0.12, rails_infill_hours_per_ft: 0.02, setup_hours: 1 },
};

export const recipeFor = (kind: string): Recipe => structuredClone(DEFAULT_RECIPES[kind] ?? DEFAULT_RECIPES.wood_privacy);
export const ratesFor = (kind: string): Rates => ({ ...(DEFAULT_RATES[kind] ?? DEFAULT_RATES.wood_privacy) });
