import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { computeTakeoff, type Takeoff } from '../../../src/lib/takeoff/takeoff';
import { recipeFor, ratesFor, DEFAULT_RECIPES } from '../../../src/lib/takeoff/defaults';
import { layoutInput, NO_SITE_RULES, type SiteRules } from '../../../src/lib/takeoff/input';
import type { Recipe } from '../../../src/lib/takeoff/recipe';
import { recipeSchema } from '../../../src/lib/takeoff/recipe';

const take = (layout: unknown, kind = 'wood_privacy', recipe?: Recipe, site: SiteRules = NO_SITE_RULES) =>
  computeTakeoff(layoutInput.parse(layout), recipe ?? recipeFor(kind), ratesFor(kind), site);
const ok = (t: ReturnType<typeof take>): Takeoff => {
  if (!t.ok) throw new Error(JSON.stringify(t.fields));
  return t;
};
const buy = (t: Takeoff, group: string) => t.materials.filter((m) => m.group === group).reduce((a, m) => a + m.buyQty, 0);

describe('rules of thumb (common practice, no source)', () => {
  // "Nine 6 in holes, 18–20 in deep with 3–4 in gravel, 4×4 posts: four to five 50 lb bags of
  // packaged concrete" (common practice, no source; REFERENCES "a small job"). 64 ft at 8 ft
  // bays is 8 bays and 9 posts; posts cut from 10 ft stock in halves (the wire-panel style) go
  // 18–20 in into the ground at 40–41 in above grade; the bag yields 0.375 ft³ (manufacturers'
  // published yield, as repeated in trade guides).
  it.each([40, 41])('nine 6 in holes 18–20 in deep over a 3–4 in gravel base around 4×4 posts take four to five 50 lb bags (%i in fence)', (heightIn) => {
    const t = ok(take({ runs: [{ lengthFt: 64, heightIn }] }, 'wire_panel'));
    expect(t.holes).toBe(9);
    // End and line posts share one spec and height, so one hole geometry.
    expect(new Set(t.postGroups.map((x) => `${x.holeDiameterIn} ${x.holeDepthIn} ${x.fillDepthIn}`)).size).toBe(1);
    const g = t.postGroups[0];
    expect(g.holeDiameterIn).toBe(6);
    // The hole is 18–20 in deep and the gravel base is its bottom 3–4 in: the post is buried the
    // hole's whole depth, gravel included.
    expect(g.holeDepthIn).toBeGreaterThanOrEqual(18);
    expect(g.holeDepthIn).toBeLessThanOrEqual(20);
    expect(g.embedmentIn).toBe(g.holeDepthIn);
    const gravelIn = g.holeDepthIn - g.fillDepthIn;
    expect(gravelIn).toBeGreaterThanOrEqual(3);
    expect(gravelIn).toBeLessThanOrEqual(4);
    // The geometry, independently (REFERENCES "concrete per hole", by arithmetic):
    // (π·3² − 3.5²) in² × (hole depth − gravel) × 9 holes ÷ 1728 ÷ 0.375.
    const bagsByHand = ((Math.PI * 9 - 3.5 * 3.5) * (g.holeDepthIn - gravelIn) * 9) / 1728 / 0.375;
    const line = t.materials.find((m) => m.sku === 'CONC-50')!;
    expect(line.takeoffQty).toBeCloseTo(bagsByHand, 3);
    // Four to five bags, both as whole bags of the bare geometry and as bought after the style's waste.
    expect([4, 5]).toContain(Math.ceil(line.takeoffQty));
    expect([4, 5]).toContain(t.concrete!.bags);
  });

  it('a 36–42 in fence on posts cut from 10 ft stock in halves buries about 18 in, including a 3–4 in gravel base', () => {
    for (const heightIn of [36, 40, 42]) {
      const t = ok(take({ runs: [{ lengthFt: 16, heightIn }] }, 'wire_panel'));
      const g = t.postGroups[0];
      expect(g.lengthIn).toBeCloseTo(59.94, 2);
      expect(g.embedmentIn).toBeGreaterThanOrEqual(17.5);
      expect(g.embedmentIn).toBeLessThanOrEqual(24);
      // The gravel is inside the buried length: the hole is no deeper than the post goes.
      expect(g.holeDepthIn).toBe(g.embedmentIn);
      expect(g.holeDepthIn - g.fillDepthIn).toBe(4);
      // Two posts from each 10 ft board.
      const cut = t.cutList.find((c) => c.group === 'posts' && c.stockFt === 10)!;
      expect(cut.pieces).toHaveLength(2);
    }
    const at42 = ok(take({ runs: [{ lengthFt: 16, heightIn: 42 }] }, 'wire_panel')).postGroups[0];
    expect(Math.abs(at42.holeDepthIn - 18)).toBeLessThan(0.5);
  });

  it('a gravel base under the post (3–6 in of compacted gravel) makes the hole deeper than the post goes', () => {
    const t = ok(take({ runs: [{ lengthFt: 16, heightIn: 72 }] }));
    const g = t.postGroups[0];
    expect(recipeFor('wood_privacy').hole.gravelBase).toBe('below_embedment');
    expect(g.holeDepthIn).toBe(g.embedmentIn + 4);
    expect(g.fillDepthIn).toBe(g.embedmentIn);
    expect(g.gravelCuInEach).toBeCloseTo(Math.PI * (g.holeDiameterIn / 2) ** 2 * 4, 3);
  });

  it('buries posts a third to a half of their length, and warns below a third', () => {
    const t = ok(take({ runs: [{ lengthFt: 40, heightIn: 72 }] }));
    const g = t.postGroups[0];
    expect(g.embedmentIn / g.lengthIn).toBeGreaterThanOrEqual(1 / 3 - 1e-9);
    expect(g.embedmentIn / g.lengthIn).toBeLessThanOrEqual(1 / 2);
    expect(t.warnings.join(' ')).not.toMatch(/third/);
    const shallow = { ...recipeFor('wood_privacy'), embedment: { rule: 'fixed_depth' as const, depthIn: 24 } };
    const w = ok(take({ runs: [{ lengthFt: 40, heightIn: 72 }] }, 'wood_privacy', shallow));
    expect(w.warnings.join(' ')).toMatch(/under a third/);
  });

  it('digs about three times the post width: a 4×4 takes a 10–12 in hole; light fences use 6 in augered holes', () => {
    const t = ok(take({ runs: [{ lengthFt: 16, heightIn: 72 }] }));
    expect(t.postGroups[0].holeDiameterIn).toBeGreaterThanOrEqual(10);
    expect(t.postGroups[0].holeDiameterIn).toBeLessThanOrEqual(12);
    expect(ok(take({ runs: [{ lengthFt: 16, heightIn: 42 }] }, 'wire_panel')).postGroups[0].holeDiameterIn).toBe(6);
  });

  it('rails per bay: 2 up to about 4 ft, 3 for 5–6 ft, 4 for 8 ft', () => {
    const rails = (h: number) => buy(ok(take({ runs: [{ lengthFt: 8, heightIn: h }] })), 'rails') ;
    const pieces = (h: number) => ok(take({ runs: [{ lengthFt: 8, heightIn: h }] })).cutList.filter((c) => c.group === 'rails').reduce((a, c) => a + c.count * c.pieces.length, 0);
    expect([pieces(48), pieces(72), pieces(96)]).toEqual([2, 3, 4]);
    expect(rails(72)).toBeGreaterThanOrEqual(3);
  });

  it('pickets n = ceil((L + g) ÷ (w + g)) (by arithmetic)', () => {
    const r = { ...recipeFor('wood_privacy'), infill: { kind: 'pickets' as const, label: 'Picket', sku: 'P', widthIn: 3.5, gapIn: 1.5, lengthFt: 6 } };
    const t = ok(take({ runs: [{ lengthFt: 8, heightIn: 48 }] }, 'wood_privacy', r));
    expect(t.materials.find((m) => m.sku === 'P')!.takeoffQty).toBe(Math.ceil((96 + 1.5) / 5));
  });
});

describe('ASTM F567, Standard Practice for Installation of Chain-Link Fence [pub] (clauses as REFERENCES gives them)', () => {
  // §5.1: posts at least 24 in deep, plus 3 in for each foot of fence height over 4 ft. A part of
  // a foot (66 in is 1½ ft over) counts as a whole foot, the deeper of the two readings.
  it.each([
    [36, 24],
    [48, 24],
    [60, 27],
    [66, 30],
    [72, 30],
  ])('a %i in chain-link fence sets every post %i in deep (§5.1)', (heightIn, depthIn) => {
    const t = ok(take({ runs: [{ lengthFt: 95, heightIn }], gates: [{ runIndex: 0, widthFt: 4, offsetFt: 20 }] }, 'chain_link'));
    expect(new Set(t.postGroups.map((g) => g.kind))).toEqual(new Set(['end', 'line', 'gate']));
    for (const g of t.postGroups) {
      expect(g.embedmentIn).toBe(depthIn);
      expect(g.lengthIn).toBe(heightIn + depthIn);
    }
    // Every post is cut from a stock length the style sells: no field error, a buy line for each.
    expect(t.cutList.filter((c) => c.group === 'posts').every((c) => c.pieces.every((p) => p <= c.stockFt * 12))).toBe(true);
  });

  it('line posts at most 10 ft on centre, terminal posts at ends, corners and gates (§4)', () => {
    const t = ok(take({ runs: [{ lengthFt: 95, heightIn: 48 }, { lengthFt: 41, heightIn: 48, connectsToPrevious: true }], gates: [{ runIndex: 1, widthFt: 4, offsetFt: 10 }] }, 'chain_link'));
    for (const run of t.runs) for (const seg of run.segments) expect(seg.bayFt).toBeLessThanOrEqual(10);
    const terminal = recipeFor('chain_link').posts.terminal!.label;
    for (const g of t.postGroups) expect(g.spec === terminal).toBe(g.kind !== 'line');
    expect(t.posts).toMatchObject({ end: 2, corner: 1, gate: 2 });
  });

  it('holes 4 × the post OD for posts up to 4 in OD (§5.1), in whole even auger sizes', () => {
    const t = ok(take({ runs: [{ lengthFt: 95, heightIn: 48 }] }, 'chain_link'));
    const r = recipeFor('chain_link');
    const line = t.postGroups.find((g) => g.kind === 'line')!;
    const end = t.postGroups.find((g) => g.kind === 'end')!;
    expect(line.holeDiameterIn).toBeGreaterThanOrEqual(4 * r.posts.line.widthIn);
    expect(end.holeDiameterIn).toBeGreaterThanOrEqual(4 * r.posts.terminal!.widthIn);
    expect(line.holeDiameterIn - 4 * r.posts.line.widthIn).toBeLessThan(2);
  });
});

describe('geometry', () => {
  it('two connected runs share their corner post, a gate adds its posts', () => {
    const t = ok(take({ runs: [{ lengthFt: 40, heightIn: 72 }, { lengthFt: 30, heightIn: 72, connectsToPrevious: true }], gates: [{ runIndex: 1, widthFt: 4 }] }));
    // Run 1: 5 bays, 6 posts. Run 2 (corner shared): 13 + gate 4 + 13 ft → 2 + 2 bays, posts 2 gate + 1 line + 1 line + end.
    expect(t.posts).toEqual({ end: 2, corner: 1, line: 6, gate: 2, total: 11 });
    expect(t.fenceFt).toBe(66);
    expect(t.gates).toEqual({ single: 1, double: 0, leaves: 1 });
  });

  it('an enclosure of four runs has as many posts as bays (no ends)', () => {
    const t = ok(take({ runs: [0, 90, 180, 270].map((h, i) => ({ lengthFt: 32, heightIn: 48, headingDeg: h, connectsToPrevious: i > 0 })), closed: true }, 'wire_panel'));
    expect(t.posts.end).toBe(0);
    expect(t.posts.corner).toBe(4);
    expect(t.posts.total).toBe(t.bays);
  });

  it('posts = bays + 1 for every free-standing run; quantities are never negative or NaN', () => {
    const kinds = Object.keys(DEFAULT_RECIPES);
    fc.assert(
      fc.property(
        fc.constantFrom(...kinds),
        fc.array(fc.double({ min: 1, max: 400, noNaN: true }), { minLength: 1, maxLength: 5 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (kind, lengths, hFrac) => {
          const r = recipeFor(kind);
          const heightIn = Math.round(r.heightMinIn + hFrac * (r.heightMaxIn - r.heightMinIn));
          const t = take({ runs: lengths.map((lengthFt) => ({ lengthFt, heightIn })) }, kind);
          if (!t.ok) throw new Error(JSON.stringify(t.fields));
          for (const run of t.runs) expect(run.posts).toBe(run.bays + 1);
          expect(t.posts.total).toBe(t.bays + lengths.length);
          const numbers = [t.fenceFt, t.holes, ...t.materials.flatMap((m) => [m.takeoffQty, m.buyQty, m.boardFeet ?? 0]), ...t.labour.flatMap((l) => [l.crewHours, l.manHours]), ...t.rentals.map((x) => x.days), ...t.quantities.map((q) => q.value)];
          for (const n of numbers) { expect(Number.isFinite(n)).toBe(true); expect(n).toBeGreaterThanOrEqual(0); }
          for (const m of t.materials.filter((x) => !['posts', 'rails', 'cap'].includes(x.group))) expect(m.buyQty).toBeGreaterThanOrEqual(Math.ceil(m.takeoffQty - 1e-7));
        },
      ),
      { numRuns: 150 },
    );
  });

  it('buys at least the cut list of each group, after waste', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 3, max: 200 }), { minLength: 1, maxLength: 4 }), (lengths) => {
        const t = ok(take({ runs: lengths.map((lengthFt, i) => ({ lengthFt, heightIn: 72, connectsToPrevious: i > 0 })) }));
        for (const group of ['posts', 'rails'] as const) {
          const boardsNeeded = t.cutList.filter((c) => c.group === group).reduce((a, c) => a + c.count, 0);
          expect(buy(t, group)).toBeGreaterThanOrEqual(boardsNeeded);
        }
      }),
      { numRuns: 80 },
    );
  });

  it('rounds concrete up once over the job, not hole by hole', () => {
    const t = ok(take({ runs: [{ lengthFt: 152, heightIn: 72 }] }));
    const exact = t.concrete!.cuFt / t.concrete!.bagYieldCuFt;
    expect(t.concrete!.bags).toBe(Math.ceil(exact * 1.1 - 1e-7));
    expect(t.concrete!.bags).toBeLessThan(t.holes * Math.ceil((exact / t.holes) * 1.1));
  });

  it('rents the auger by the half day, then by the day, for the hours of digging', () => {
    const small = ok(take({ runs: [{ lengthFt: 40, heightIn: 72 }] }));
    expect(small.rentals[0]).toMatchObject({ halfDays: 1, fullDays: 0, days: 0.5 });
    const big = ok(take({ runs: [{ lengthFt: 600, heightIn: 72 }] }));
    expect(big.rentals[0].days).toBeGreaterThanOrEqual(1);
    expect(big.rentals[0].coversHours).toBeCloseTo(big.holes * ratesFor('wood_privacy').hole_hours, 6);
  });

  it('labour hours follow the rates × crew size', () => {
    const t = ok(take({ runs: [{ lengthFt: 40, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4, kind: 'single' }] }));
    const r = ratesFor('wood_privacy');
    const posts = t.labour.find((l) => l.task === 'posts')!;
    expect(posts.crewHours).toBeCloseTo(t.holes * (r.hole_hours + r.post_set_hours), 6);
    expect(posts.manHours).toBeCloseTo(posts.crewHours * r.crew_size, 6);
    expect(t.labour.find((l) => l.task === 'gates')!.crewHours).toBe(r.gate_hours);
    // Gate labour is per gate (issue 3's rate list: "per gate"): a double gate is one gate, not two leaves.
    const two = ok(take({ runs: [{ lengthFt: 60, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4, offsetFt: 4 }, { runIndex: 0, widthFt: 10, kind: 'double', offsetFt: 30 }] }));
    expect(two.gates).toEqual({ single: 1, double: 1, leaves: 3 });
    expect(two.labour.find((l) => l.task === 'gates')!.crewHours).toBe(2 * r.gate_hours);
  });

  it('warns when a stretch left beside a gate puts posts closer than the infill allows', () => {
    // Wood privacy: bays no shorter than 2 ft. A 4 ft gate 14½ ft into a 20 ft run leaves 1½ ft to the end.
    const short = ok(take({ runs: [{ lengthFt: 20, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4, offsetFt: 14.5 }] }));
    expect(short.runs[0].segments.map((x) => [x.bays, x.bayFt])).toEqual([[2, 7.25], [1, 1.5]]);
    expect(short.warnings).toContain("Run 1: a 1 ft 6 in bay puts posts closer than this style's infill allows (at least 2 ft).");
    // Exactly the shortest bay is allowed.
    const fits = ok(take({ runs: [{ lengthFt: 20, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4, offsetFt: 14 }] }));
    expect(fits.warnings.join(' ')).not.toMatch(/closer than/);
  });

  it('the frost depth deepens the embedment when the company sets one', () => {
    const site: SiteRules = { frostDepthIn: 42, permitMaxHeightIn: { front: 48, side: 72, back: 72 } };
    const t = ok(take({ runs: [{ lengthFt: 16, heightIn: 72, yard: 'front' }] }, 'wood_privacy', undefined, site));
    expect(t.postGroups[0].embedmentIn).toBe(42);
    expect(t.warnings.join(' ')).toMatch(/permit/);
  });
});

describe('chain-link fabric by height', () => {
  // Chain-link fabric is sold in 50 ft rolls 36–96 in high (REFERENCES, products, from memory);
  // a run takes the lowest roll at least as high as its fence.
  const fabric = (t: Takeoff) => t.materials.filter((m) => m.group === 'infill').map((m) => [m.sku, m.takeoffQty]);

  it('a 4 ft and a 6 ft chain-link fence buy different fabric', () => {
    const four = ok(take({ runs: [{ lengthFt: 100, heightIn: 48 }] }, 'chain_link'));
    const six = ok(take({ runs: [{ lengthFt: 100, heightIn: 72 }] }, 'chain_link'));
    expect(fabric(four)).toEqual([['CL-FABRIC-48', 2]]);
    expect(fabric(six)).toEqual([['CL-FABRIC-72', 2]]);
    expect(four.warnings.join(' ')).not.toMatch(/fabric roll/);
  });

  it('takes the lowest roll at least as high as each run, and pools feet by roll', () => {
    const t = ok(take({ runs: [{ lengthFt: 60, heightIn: 42 }, { lengthFt: 40, heightIn: 54, connectsToPrevious: true }, { lengthFt: 15, heightIn: 42, connectsToPrevious: true }] }, 'chain_link'));
    expect(fabric(t)).toEqual([['CL-FABRIC-42', 1.5], ['CL-FABRIC-60', 0.8]]);
    const line = t.materials.find((m) => m.sku === 'CL-FABRIC-42')!;
    expect(line.buyQty).toBe(2);
    expect(line.unit).toBe('roll');
  });

  it('warns when no roll is as high as the fence, and prices the highest it has', () => {
    const base = recipeFor('chain_link');
    if (base.infill.kind !== 'roll') throw new Error('chain link is not a roll');
    const r: Recipe = { ...base, infill: { ...base.infill, rolls: base.infill.rolls.filter((x) => x.heightIn <= 60) } };
    const t = ok(take({ runs: [{ lengthFt: 50, heightIn: 72, label: 'Back' }] }, 'chain_link', r));
    expect(t.warnings.join(' ')).toMatch(/Back: no fabric roll of this style is 72 in high \(the highest is 60 in/);
    expect(fabric(t)).toEqual([['CL-FABRIC-60', 1]]);
  });

  it('a roll recipe saved with one item code and no height reads as one roll as high as the style goes', () => {
    const old: any = structuredClone(DEFAULT_RECIPES.chain_link);
    old.infill = { kind: 'roll', label: 'Chain-link fabric 11½ ga, 50 ft roll', sku: 'CL-FABRIC-50', rollLengthFt: 50 };
    const r = recipeSchema.parse(old);
    expect(r.infill).toEqual({ kind: 'roll', rollLengthFt: 50, rolls: [{ heightIn: 72, label: 'Chain-link fabric 11½ ga, 50 ft roll', sku: 'CL-FABRIC-50' }] });
    const t = ok(take({ runs: [{ lengthFt: 100, heightIn: 60 }] }, 'chain_link', r));
    expect(fabric(t)).toEqual([['CL-FABRIC-50', 2]]);
    expect(t.warnings.join(' ')).not.toMatch(/fabric roll/);
  });
});

describe('bad input', () => {
  it('refuses zero and negative lengths at the schema', () => {
    for (const lengthFt of [0, -5, Number.NaN]) expect(layoutInput.safeParse({ runs: [{ lengthFt, heightIn: 72 }] }).success).toBe(false);
  });

  it('gives field errors for a gate wider than its run, past its end, or overlapping another', () => {
    const wide = take({ runs: [{ lengthFt: 3, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4 }] });
    expect(wide.ok).toBe(false);
    if (!wide.ok) expect(wide.fields['gates.0.widthFt']).toMatch(/wider than its run/);
    const past = take({ runs: [{ lengthFt: 10, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4, offsetFt: 8 }] });
    if (!past.ok) expect(past.fields['gates.0.offsetFt']).toBeTruthy(); else throw new Error('accepted');
    const overlap = take({ runs: [{ lengthFt: 30, heightIn: 72 }], gates: [{ runIndex: 0, widthFt: 4, offsetFt: 2 }, { runIndex: 0, widthFt: 4, offsetFt: 4 }] });
    if (!overlap.ok) expect(overlap.fields['gates.1.offsetFt']).toMatch(/overlaps/); else throw new Error('accepted');
    const noRun = take({ runs: [{ lengthFt: 30, heightIn: 72 }], gates: [{ runIndex: 3, widthFt: 4 }] });
    if (!noRun.ok) expect(noRun.fields['gates.0.runIndex']).toBeTruthy(); else throw new Error('accepted');
  });

  it('gives a field error for a height the style cannot build', () => {
    const t = take({ runs: [{ lengthFt: 30, heightIn: 120 }] });
    if (!t.ok) expect(t.fields['runs.0.heightIn']).toMatch(/48–96 in/); else throw new Error('accepted');
    const r = { ...recipeFor('wood_privacy'), heightMaxIn: 144 };
    const tooLong = take({ runs: [{ lengthFt: 30, heightIn: 120 }] }, 'wood_privacy', r);
    if (!tooLong.ok) expect(tooLong.fields['runs.0.heightIn']).toMatch(/longest stock is 12 ft/); else throw new Error('accepted');
  });

  it('every default recipe passes its own schema', () => {
    for (const [kind, r] of Object.entries(DEFAULT_RECIPES)) expect(recipeSchema.safeParse(r).success, kind).toBe(true);
  });

  it('reads recipes saved before a field existed as they meant then, and a parsed recipe parses to itself', () => {
    const saved = (kind: string) => {
      const r: any = structuredClone(DEFAULT_RECIPES[kind]);
      delete r.hole.gravelBase;
      return r;
    };
    expect(recipeSchema.parse(saved('wire_panel')).hole.gravelBase).toBe('within_embedment');
    expect(recipeSchema.parse(saved('split_rail')).hole.gravelBase).toBe('within_embedment');
    expect(recipeSchema.parse(saved('wood_privacy')).hole.gravelBase).toBe('below_embedment');
    for (const kind of Object.keys(DEFAULT_RECIPES)) {
      const once = recipeSchema.parse(saved(kind));
      expect(recipeSchema.parse(once), kind).toEqual(once);
    }
  });
});

describe('the REFERENCES worked examples, through the engine (by arithmetic)', () => {
  it('20 holes 10 in across with 24 in of concrete around 4×4 posts take 31 bags of 80 lb pooled, 40 rounded hole by hole', () => {
    // 1590.96 in³ = 0.9207 ft³ a hole; an 80 lb bag yields about 0.60 ft³ (manufacturers' published yield, as
    // repeated in trade guides): 1.53 bags a hole, 30.7 for 20 holes.
    const base = recipeFor('wood_privacy');
    const r: Recipe = {
      ...base, embedment: { rule: 'fixed_depth', depthIn: 24 }, minEmbedmentIn: 0,
      hole: { ...base.hole, diameterIn: 10, gravelBase: 'below_embedment', concrete: { label: 'Packaged concrete 80 lb', sku: 'CONC-80', bagLb: 80, bagYieldCuFt: 0.6 } },
      wastePct: { ...base.wastePct, concrete: 0 },
    };
    const t = ok(take({ runs: [{ lengthFt: 152, heightIn: 48 }] }, 'wood_privacy', r));
    expect(t.holes).toBe(20);
    for (const g of t.postGroups) {
      expect(g.fillDepthIn).toBe(24);
      expect(g.concreteCuInEach).toBeCloseTo(1590.96, 2);
    }
    expect(t.concrete!.cuFt).toBeCloseTo(20 * 0.9207, 3);
    expect(t.concrete!.bags).toBe(31);
    expect(t.holes * Math.ceil(t.concrete!.cuFt / t.holes / 0.6)).toBe(40);
  });

  it('twelve 4×4 × 10 ft posts are 160 board feet (4 × 4 × 10 ÷ 12 = 13.333 each)', () => {
    const t = ok(take({ runs: [{ lengthFt: 40, heightIn: 72 }, { lengthFt: 30, heightIn: 72, connectsToPrevious: true }], gates: [{ runIndex: 1, widthFt: 4 }] }));
    const posts = t.materials.find((m) => m.sku === 'PT-4X4-10')!;
    expect(posts.buyQty).toBe(12);
    expect(posts.boardFeet).toBeCloseTo(160, 6);
  });
});

describe('actual dimensions where volumes need them', () => {
  it('subtracts a nominal 4×6 post as 3½ × 5½ in (PS 20 dressed sizes) from the concrete', () => {
    const base = recipeFor('wood_privacy');
    const r = { ...base, posts: { ...base.posts, line: { ...base.posts.line, label: '4×6 post', widthIn: 5.5, nominal: { thicknessIn: 4, widthIn: 6 } } } };
    const t = ok(take({ runs: [{ lengthFt: 16, heightIn: 72 }] }, 'wood_privacy', r));
    const line = t.postGroups.find((g) => g.kind === 'line')!;
    const d = line.holeDiameterIn;
    expect(d).toBe(18); // 3 × 5½ = 16½ → the next even auger size
    expect(line.concreteCuInEach).toBeCloseTo((Math.PI * (d / 2) ** 2 - 3.5 * 5.5) * line.embedmentIn, 3);
  });
});

describe('the largest takeoff the API accepts', () => {
  // The API's limits (src/lib/takeoff/input.ts): 60 runs of at most 2,000 ft, 30 gates. Every
  // run a different length and height and every gate somewhere else gives the most distinct
  // post, rail and cap lengths, which is what the packing's work follows.
  const layout = layoutInput.parse({
    runs: Array.from({ length: 60 }, (_, i) => ({ lengthFt: 2000 - i * 0.37, heightIn: 36 + (i % 15), connectsToPrevious: i > 0 })),
    gates: Array.from({ length: 30 }, (_, i) => ({ runIndex: 2 * i, widthFt: 4 + (i % 2) * 0.5, offsetFt: 100 + i * 13.7 })),
    closed: true,
  });
  // The most pieces an inline recipe can ask for: posts every 2 ft, eight rails a bay, a cap.
  const wire = recipeFor('wire_panel');
  const most = recipeSchema.parse({
    ...wire, heightMinIn: 12, heightMaxIn: 144, spacingFt: 2, minBayFt: 0.5,
    rails: { ...wire.rails, byHeight: [{ maxHeightIn: 144, count: 8 }] },
  });
  const pieces = (t: Takeoff, group: string) => t.cutList.filter((c) => c.group === group).reduce((a, c) => a + c.count * c.pieces.length, 0);

  it.each([['the wire-panel style', wire], ['an inline recipe at its limits', most]] as const)('completes with every piece cut once: %s', (_, recipe) => {
    const t = ok(computeTakeoff(layout, recipe, ratesFor('wire_panel'), NO_SITE_RULES));
    const railsPerBay = recipe.rails!.byHeight[0].count;
    expect(pieces(t, 'posts')).toBe(t.posts.total);
    expect(pieces(t, 'rails')).toBe(railsPerBay * t.bays);
    expect(pieces(t, 'cap')).toBe(t.bays);
    // One closed loop: as many posts as bays plus one for each side of each gate opening.
    expect(t.posts.total).toBe(t.bays + 30);
    // Boards cut alike are listed once with their count: the cut list grows with the distinct
    // lengths (at most four ways of cutting per length), not with the tens of thousands of pieces.
    const postLengths = new Set(t.postGroups.map((g) => g.lengthIn)).size;
    const bayLengths = new Set(t.runs.flatMap((r) => r.segments.map((s) => s.bayFt))).size;
    const entries = (group: string) => t.cutList.filter((c) => c.group === group).length;
    expect(entries('posts')).toBeLessThanOrEqual(4 * postLengths);
    expect(entries('rails')).toBeLessThanOrEqual(4 * bayLengths);
    expect(entries('cap')).toBeLessThanOrEqual(4 * bayLengths);
    for (const group of ['posts', 'rails', 'cap'] as const) {
      const boards = t.cutList.filter((c) => c.group === group).reduce((a, c) => a + c.count, 0);
      expect(buy(t, group)).toBeGreaterThanOrEqual(boards);
    }
  }, 30_000);
});
