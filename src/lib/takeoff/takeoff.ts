import type { FieldErrors } from '../errors.ts';
import { actualLumberIn, boardFeet, cuInToCuFt, cylinderCuIn, formatFeetInches, ftToIn, roundTo } from '../units.ts';
import { packStockCounts, type PieceCount } from './packing.ts';
import type { PostSpec, Recipe, WasteKey } from './recipe.ts';
import type { Rates, LabourTask } from './rates.ts';
import { LABOUR_TASKS } from './rates.ts';
import type { LayoutInput, SiteRules, YardPosition } from './input.ts';
import { YARD_LABELS } from './input.ts';

export type PostKind = 'end' | 'corner' | 'line' | 'gate';
export type MaterialGroup = 'posts' | 'rails' | 'cap' | 'infill' | 'concrete' | 'gravel' | 'hardware' | 'gates';

export interface Segment {
  /** feet from the run's start */
  fromFt: number;
  toFt: number;
  lengthFt: number;
  bays: number;
  /** feet, post centre to post centre */
  bayFt: number;
}

export interface RunResult {
  index: number;
  label: string;
  lengthFt: number;
  heightIn: number;
  yard: YardPosition;
  /** feet of fence, the run less its gate openings */
  fenceFt: number;
  gateFt: number;
  segments: Segment[];
  bays: number;
  /** posts on this run, a shared corner counted on the run that comes first */
  posts: number;
}

export interface PostGroup {
  kind: PostKind;
  spec: string;
  heightIn: number;
  count: number;
  /** inches */
  lengthIn: number;
  embedmentIn: number;
  holeDiameterIn: number;
  holeDepthIn: number;
  /** inches of the hole filled around the post above the gravel (concrete, or tamped earth when the style has none) */
  fillDepthIn: number;
  /** in³ of concrete in one hole */
  concreteCuInEach: number;
  /** in³ of gravel in one hole */
  gravelCuInEach: number;
}

export interface MaterialLine {
  /** price-book item code; the bid prices by it */
  sku: string;
  label: string;
  group: MaterialGroup;
  unit: string;
  /** what the takeoff needs, before waste, in `unit` */
  takeoffQty: number;
  wastePct: number;
  /** what to buy, whole units, after waste */
  buyQty: number;
  /** board feet of the units bought, for lumber */
  boardFeet: number | null;
  note?: string;
}

export interface CutBoard {
  group: MaterialGroup;
  label: string;
  sku: string;
  stockFt: number;
  /** inches, longest first */
  pieces: number[];
  offcutIn: number;
  /** boards cut this same way */
  count: number;
}

export interface LabourLine {
  task: LabourTask;
  /** crew-hours */
  crewHours: number;
  /** person-hours = crew-hours × crew size */
  manHours: number;
}

export interface RentalLine {
  label: string;
  daySku: string;
  halfDaySku: string | null;
  /** crew-hours of the work the equipment is rented for */
  coversHours: number;
  fullDays: number;
  halfDays: number;
  /** rental days, a half day as 0.5 */
  days: number;
}

export interface Quantity {
  key: string;
  label: string;
  value: number;
  unit: string;
}

export interface Takeoff {
  ok: true;
  runs: RunResult[];
  /** feet of fence, gate openings excluded */
  fenceFt: number;
  /** feet of the runs, gate openings included */
  totalLengthFt: number;
  bays: number;
  posts: Record<PostKind | 'total', number>;
  holes: number;
  gates: { single: number; double: number; leaves: number };
  postGroups: PostGroup[];
  concrete: { cuFt: number; bagLb: number; bagYieldCuFt: number; bags: number } | null;
  gravel: { cuFt: number; bags: number } | null;
  materials: MaterialLine[];
  cutList: CutBoard[];
  labour: LabourLine[];
  rentals: RentalLine[];
  quantities: Quantity[];
  warnings: string[];
}

export interface TakeoffFailure {
  ok: false;
  fields: FieldErrors;
  warnings: string[];
}

const EPS = 1e-6;
const r4 = (x: number) => roundTo(x, 4);
/** Whole units to buy: round up, ignoring float dust such as 4.0000000001. */
const ceilQty = (x: number) => Math.max(0, Math.ceil(x - 1e-7));
const withWaste = (qty: number, pct: number) => ceilQty(qty * (1 + pct / 100));

function postLengthFor(recipe: Recipe, heightIn: number, site: SiteRules): { embedmentIn: number; lengthIn: number } {
  const e = recipe.embedment;
  let emb: number;
  switch (e.rule) {
    case 'fraction_of_length': emb = (heightIn * e.fraction) / (1 - e.fraction); break;
    case 'fraction_of_height': emb = heightIn * e.fraction; break;
    case 'fixed_depth': emb = e.depthIn; break;
    case 'depth_plus_per_ft': emb = e.baseIn + e.perFtIn * Math.max(0, Math.ceil((heightIn - e.overHeightIn) / 12 - EPS)); break;
    case 'stock_split': emb = (ftToIn(e.stockFt) - (e.pieces - 1) * recipe.kerfIn) / e.pieces - heightIn; break;
  }
  emb = Math.max(emb, recipe.minEmbedmentIn, site.frostDepthIn ?? 0);
  return { embedmentIn: emb, lengthIn: heightIn + emb };
}

/** A post's dressed size, inches: a nominal 4×4 of lumber is 3½ × 3½; other posts as given. */
function postSizeIn(spec: PostSpec): [number, number] {
  if (spec.shape === 'square' && spec.nominal) return [actualLumberIn(spec.nominal.thicknessIn), actualLumberIn(spec.nominal.widthIn)];
  return [spec.widthIn, spec.widthIn];
}

/** 3 × a 3½ in post is 10½ in: augers come in even inches, so round up to 12. */
function holeDiameterFor(recipe: Recipe, spec: PostSpec): number {
  if (recipe.hole.diameterIn) return recipe.hole.diameterIn;
  return Math.ceil((recipe.hole.diameterFactor * Math.max(...postSizeIn(spec))) / 2 - EPS) * 2;
}

function crossSectionSqIn(spec: PostSpec): number {
  const [t, w] = postSizeIn(spec);
  return spec.shape === 'square' ? t * w : Math.PI * (spec.widthIn / 2) ** 2;
}

function railsFor(recipe: Recipe, heightIn: number): number {
  const rows = [...(recipe.rails?.byHeight ?? [])].sort((a, b) => a.maxHeightIn - b.maxHeightIn);
  return (rows.find((r) => heightIn <= r.maxHeightIn + EPS) ?? rows[rows.length - 1])?.count ?? 0;
}

/** Posts at one station, or a run's line posts counted together (`count` of them). */
interface PostNode { kind: PostKind; heightIn: number; runIndex: number; count: number }

/**
 * The takeoff: from runs, gates and a style's recipe to bays, posts, holes, concrete,
 * a buy list in stock lengths, labour hours and rentals. Pure; no prices.
 */
export function computeTakeoff(layout: LayoutInput, recipe: Recipe, rates: Rates, site: SiteRules): Takeoff | TakeoffFailure {
  const fields: FieldErrors = {};
  const warnings: string[] = [];
  const { runs } = layout;

  runs.forEach((run, i) => {
    if (run.heightIn < recipe.heightMinIn - EPS || run.heightIn > recipe.heightMaxIn + EPS)
      fields[`runs.${i}.heightIn`] = `This style builds fences ${recipe.heightMinIn}–${recipe.heightMaxIn} in high.`;
    if (i === 0 && run.connectsToPrevious) fields[`runs.0.connectsToPrevious`] = 'The first run has no run before it to connect to.';
  });
  if (layout.closed && runs.length < 3) fields.closed = 'An enclosure needs at least three runs.';

  const gatesByRun = new Map<number, { index: number; fromFt: number; toFt: number }[]>();
  layout.gates.forEach((g, gi) => {
    const run = runs[g.runIndex];
    if (!run) { fields[`gates.${gi}.runIndex`] = 'Choose one of the runs.'; return; }
    const spec = g.kind === 'double' ? recipe.gates.double : recipe.gates.single;
    if (!spec) { fields[`gates.${gi}.kind`] = 'This style has no double gate.'; return; }
    if (g.widthFt > run.lengthFt + EPS) { fields[`gates.${gi}.widthFt`] = `The gate is wider than its run (${run.lengthFt} ft).`; return; }
    if (g.widthFt > spec.maxWidthFt + EPS) { fields[`gates.${gi}.widthFt`] = `A ${g.kind} gate of this style is at most ${spec.maxWidthFt} ft wide.`; return; }
    const fromFt = g.offsetFt ?? (run.lengthFt - g.widthFt) / 2;
    if (fromFt + g.widthFt > run.lengthFt + EPS) { fields[`gates.${gi}.offsetFt`] = `The gate runs past the end of its run (${run.lengthFt} ft).`; return; }
    const list = gatesByRun.get(g.runIndex) ?? [];
    list.push({ index: gi, fromFt, toFt: fromFt + g.widthFt });
    gatesByRun.set(g.runIndex, list);
  });
  for (const list of gatesByRun.values()) {
    list.sort((a, b) => a.fromFt - b.fromFt);
    for (let k = 1; k < list.length; k++)
      if (list[k].fromFt < list[k - 1].toFt - EPS) fields[`gates.${list[k].index}.offsetFt`] = 'This gate overlaps another gate on the same run.';
  }
  if (Object.keys(fields).length) return { ok: false, fields, warnings };

  // Stations (run start, gate edges, run end) carry posts; fence segments between them get bays.
  const nodes: PostNode[] = [];
  const runResults: RunResult[] = [];
  const fenceSegments: { run: number; seg: Segment }[] = [];
  let prevEnd: PostNode | null = null;
  let firstStart: PostNode | null = null;
  const joint = (node: PostNode, heightIn: number, gateEdge: boolean) => {
    node.kind = gateEdge || node.kind === 'gate' ? 'gate' : 'corner';
    node.heightIn = Math.max(node.heightIn, heightIn);
  };

  runs.forEach((run, i) => {
    const gates = gatesByRun.get(i) ?? [];
    const edges = new Set<number>();
    const pos: number[] = [0, run.lengthFt];
    for (const g of gates) { pos.push(g.fromFt, g.toFt); }
    const stations = [...new Set(pos.map((p) => r4(p)))].sort((a, b) => a - b);
    for (const g of gates) { edges.add(r4(g.fromFt)); edges.add(r4(g.toFt)); }
    const segments: Segment[] = [];
    let posts = 0;
    let lineHere = 0;
    stations.forEach((st, k) => {
      const gateEdge = edges.has(st);
      const isStart = k === 0;
      const isEnd = k === stations.length - 1;
      if (isStart && run.connectsToPrevious && prevEnd) joint(prevEnd, run.heightIn, gateEdge);
      else if (isEnd && layout.closed && i === runs.length - 1 && firstStart) joint(firstStart, run.heightIn, gateEdge);
      else {
        const node: PostNode = { kind: gateEdge ? 'gate' : 'end', heightIn: run.heightIn, runIndex: i, count: 1 };
        nodes.push(node);
        posts++;
        if (isStart && i === 0) firstStart = node;
        if (isEnd) prevEnd = node;
      }
      if (k < stations.length - 1) {
        const from = st;
        const to = stations[k + 1];
        const opening = gates.some((g) => Math.abs(r4(g.fromFt) - from) < EPS && Math.abs(r4(g.toFt) - to) < EPS);
        if (!opening && to - from > EPS) {
          const lengthFt = to - from;
          const bays = Math.max(1, Math.ceil(lengthFt / recipe.spacingFt - EPS));
          const seg = { fromFt: from, toFt: to, lengthFt: r4(lengthFt), bays, bayFt: r4(lengthFt / bays) };
          segments.push(seg);
          fenceSegments.push({ run: i, seg });
          lineHere += bays - 1;
          if (lengthFt / bays < recipe.minBayFt - EPS)
            warnings.push(`Run ${i + 1}: a ${formatFeetInches(ftToIn(lengthFt / bays))} bay puts posts closer than this style's infill allows (at least ${recipe.minBayFt} ft).`);
        }
      }
    });
    if (lineHere) nodes.push({ kind: 'line', heightIn: run.heightIn, runIndex: i, count: lineHere });
    posts += lineHere;
    const gateFt = gates.reduce((a, g) => a + (g.toFt - g.fromFt), 0);
    runResults.push({
      index: i, label: run.label || `Run ${i + 1}`, lengthFt: run.lengthFt, heightIn: run.heightIn, yard: run.yard,
      fenceFt: r4(run.lengthFt - gateFt), gateFt: r4(gateFt), segments, bays: segments.reduce((a, s) => a + s.bays, 0), posts,
    });
  });

  const specFor = (kind: PostKind): PostSpec =>
    kind === 'line' ? recipe.posts.line : kind === 'gate' ? recipe.posts.gate ?? recipe.posts.terminal ?? recipe.posts.line : recipe.posts.terminal ?? recipe.posts.line;

  // Post groups: same kind, spec and height share a length, a hole and a concrete volume.
  const groups = new Map<string, PostGroup>();
  for (const n of nodes) {
    const spec = specFor(n.kind);
    const key = `${n.kind}|${spec.label}|${n.heightIn}`;
    const g = groups.get(key);
    if (g) { g.count += n.count; continue; }
    const { embedmentIn, lengthIn } = postLengthFor(recipe, n.heightIn, site);
    const holeDiameterIn = holeDiameterFor(recipe, spec);
    const area = Math.PI * (holeDiameterIn / 2) ** 2 - crossSectionSqIn(spec);
    if (area <= 0) return { ok: false, fields: { 'recipe.hole.diameterIn': `A ${holeDiameterIn} in hole is not wider than the ${spec.label}.` }, warnings };
    if (embedmentIn <= 0) return { ok: false, fields: { [`runs.${n.runIndex}.heightIn`]: 'Posts cut this way are too short for this height.' }, warnings };
    const gravelIn = recipe.hole.gravelDepthIn;
    const within = recipe.hole.gravelBase === 'within_embedment';
    if (within && gravelIn >= embedmentIn - EPS)
      return { ok: false, fields: { 'recipe.hole.gravelDepthIn': `A ${gravelIn} in gravel base fills the whole ${formatFeetInches(embedmentIn)} the post goes in the ground.` }, warnings };
    // Within: the post's foot stands in the gravel and the hole is as deep as the post goes.
    // Below: the post stands on the gravel and the hole is deeper by the gravel.
    const holeDepthIn = within ? embedmentIn : embedmentIn + gravelIn;
    groups.set(key, {
      kind: n.kind, spec: spec.label, heightIn: n.heightIn, count: n.count, lengthIn: r4(lengthIn), embedmentIn: r4(embedmentIn), holeDiameterIn,
      holeDepthIn: r4(holeDepthIn), fillDepthIn: r4(holeDepthIn - gravelIn),
      // Concrete fills the hole above the gravel, around the post.
      concreteCuInEach: area * (holeDepthIn - gravelIn),
      gravelCuInEach: within ? area * gravelIn : cylinderCuIn(holeDiameterIn, gravelIn),
    });
  }
  const postGroups = [...groups.values()];
  const seenWarn = new Set<number>();
  for (const g of postGroups) {
    if (g.embedmentIn < g.lengthIn / 3 - EPS && !seenWarn.has(g.heightIn)) {
      seenWarn.add(g.heightIn);
      warnings.push(`Posts for the ${g.heightIn} in fence go ${formatFeetInches(g.embedmentIn)} deep, under a third of their ${formatFeetInches(g.lengthIn)} length (common practice buries a third to a half).`);
    }
  }
  for (const r of runResults) {
    const limit = site.permitMaxHeightIn[r.yard];
    if (limit != null && r.heightIn > limit + EPS)
      warnings.push(`${r.label}: ${r.heightIn} in is taller than the ${limit} in the company allows without a permit in a ${YARD_LABELS[r.yard].toLowerCase()}; check the permit.`);
  }

  const materials: MaterialLine[] = [];
  const cutList: CutBoard[] = [];
  const add = (line: Omit<MaterialLine, 'buyQty' | 'wastePct' | 'boardFeet'> & { wasteKey: WasteKey; boardFeetEach?: number | null; buyQty?: number }) => {
    const wastePct = recipe.wastePct[line.wasteKey];
    const buyQty = line.buyQty ?? withWaste(line.takeoffQty, wastePct);
    const existing = materials.find((m) => m.sku === line.sku);
    if (existing) {
      existing.takeoffQty = r4(existing.takeoffQty + line.takeoffQty);
      existing.buyQty = line.buyQty !== undefined ? existing.buyQty + line.buyQty : withWaste(existing.takeoffQty, existing.wastePct);
      if (existing.boardFeet !== null && line.boardFeetEach) existing.boardFeet = r4(existing.buyQty * line.boardFeetEach);
      return;
    }
    materials.push({
      sku: line.sku, label: line.label, group: line.group, unit: line.unit, takeoffQty: r4(line.takeoffQty), wastePct, buyQty,
      boardFeet: line.boardFeetEach ? r4(buyQty * line.boardFeetEach) : null, ...(line.note ? { note: line.note } : {}),
    });
  };

  /** Packs cut pieces into a spec's stock lengths and adds the boards to the buy list. */
  const packInto = (group: MaterialGroup, label: string, stock: { lengthFt: number; sku: string }[], nominal: { thicknessIn: number; widthIn: number } | null, pieces: PieceCount[], wasteKey: WasteKey, fieldFor: () => string): boolean => {
    pieces = pieces.filter((p) => p.count > 0);
    if (!pieces.length) return true;
    const packing = packStockCounts(pieces, stock.map((s) => ftToIn(s.lengthFt)), recipe.kerfIn);
    if (packing.tooLong.length) {
      const longest = Math.max(...stock.map((s) => s.lengthFt));
      fields[fieldFor()] = `Needs ${label} ${formatFeetInches(Math.max(...packing.tooLong.map((p) => p.lengthIn)))} long; the longest stock is ${longest} ft.`;
      return false;
    }
    const patterns = new Map<string, CutBoard>();
    for (const b of packing.boards) {
      const st = stock.find((s) => Math.abs(ftToIn(s.lengthFt) - b.stockIn) < EPS)!;
      const key = `${st.sku}|${b.pieces.map((p) => r4(p)).join(',')}`;
      const pat = patterns.get(key);
      if (pat) pat.count += b.count;
      else patterns.set(key, { group, label, sku: st.sku, stockFt: st.lengthFt, pieces: b.pieces.map(r4), offcutIn: r4(b.offcutIn), count: b.count });
    }
    for (const pat of patterns.values()) cutList.push(pat);
    // Waste on cut stock is spare pieces (the longest), packed with the rest: 5 % of nine
    // posts is one spare post, not a spare board for each stock length.
    const pieceCount = pieces.reduce((a, p) => a + p.count, 0);
    const spares = ceilQty((pieceCount * recipe.wastePct[wasteKey]) / 100);
    const longestPiece = Math.max(...pieces.map((p) => p.lengthIn));
    const withSpares = packStockCounts([...pieces, { lengthIn: longestPiece, count: spares }], stock.map((s) => ftToIn(s.lengthFt)), recipe.kerfIn);
    const countBySku = (boards: { stockIn: number; count: number }[]) => {
      const m = new Map<string, number>();
      for (const b of boards) {
        const st = stock.find((s) => Math.abs(ftToIn(s.lengthFt) - b.stockIn) < EPS)!;
        m.set(st.sku, (m.get(st.sku) ?? 0) + b.count);
      }
      return m;
    };
    const before = countBySku(packing.boards);
    const after = countBySku(withSpares.boards);
    for (const st of stock) {
      const n = before.get(st.sku) ?? 0;
      const buy = after.get(st.sku) ?? 0;
      if (!n && !buy) continue;
      add({
        sku: st.sku, label: `${label} ${st.lengthFt} ft`, group, unit: 'each', takeoffQty: n, wasteKey, buyQty: buy,
        boardFeetEach: nominal ? boardFeet(nominal.thicknessIn, nominal.widthIn, st.lengthFt) : null,
        // Spares are counted over the group and packed with it, so a length can be bought for spares alone.
        ...(spares && buy > n ? { note: `${buy - n} more for waste: ${spares} spare ${spares === 1 ? 'piece' : 'pieces'} of ${formatFeetInches(longestPiece)} over all ${label} lengths` } : {}),
      });
    }
    return true;
  };

  // Posts, packed per spec.
  const bySpec = new Map<PostSpec, { pieces: PieceCount[]; runIndex: number }>();
  for (const g of postGroups) {
    const spec = specFor(g.kind);
    const entry = bySpec.get(spec) ?? { pieces: [], runIndex: runResults.find((r) => r.heightIn === g.heightIn)?.index ?? 0 };
    entry.pieces.push({ lengthIn: g.lengthIn, count: g.count });
    bySpec.set(spec, entry);
  }
  for (const [spec, { pieces }] of bySpec) {
    const tallest = runResults.reduce((a, r) => (r.heightIn > a.heightIn ? r : a), runResults[0]);
    packInto('posts', spec.label, spec.stock, spec.nominal, pieces, 'posts', () => `runs.${tallest.index}.heightIn`);
  }

  const fenceFt = runResults.reduce((a, r) => a + r.fenceFt, 0);
  const totalBays = fenceSegments.reduce((a, s) => a + s.seg.bays, 0);

  if (recipe.rails) {
    const rails = recipe.rails;
    if (rails.mode === 'per_bay') {
      const pieces = fenceSegments.map(({ run, seg }) => ({ lengthIn: ftToIn(seg.bayFt), count: railsFor(recipe, runs[run].heightIn) * seg.bays }));
      packInto('rails', rails.label, rails.stock, rails.nominal, pieces, 'rails', () => 'recipe.rails.stock');
    } else if (rails.mode === 'each') {
      const n = fenceSegments.reduce((a, { run, seg }) => a + railsFor(recipe, runs[run].heightIn) * seg.bays, 0);
      const st = rails.stock[0];
      if (n) add({ sku: st.sku, label: `${rails.label} ${st.lengthFt} ft`, group: 'rails', unit: 'each', takeoffQty: n, wasteKey: 'rails', boardFeetEach: rails.nominal ? boardFeet(rails.nominal.thicknessIn, rails.nominal.widthIn, st.lengthFt) : null });
      const longBay = fenceSegments.find(({ seg }) => seg.bayFt > st.lengthFt + EPS);
      if (longBay) warnings.push(`Bays of ${longBay.seg.bayFt} ft are longer than the ${st.lengthFt} ft ${rails.label}.`);
    } else {
      const st = rails.stock[0];
      const feet = fenceSegments.reduce((a, { run, seg }) => a + railsFor(recipe, runs[run].heightIn) * seg.lengthFt, 0);
      if (feet) add({ sku: st.sku, label: `${rails.label} ${st.lengthFt} ft`, group: 'rails', unit: 'each', takeoffQty: feet / st.lengthFt, wasteKey: 'rails', note: `${roundTo(feet, 2)} ft of rail` });
    }
  }
  if (recipe.cap) {
    const pieces = fenceSegments.map(({ seg }) => ({ lengthIn: ftToIn(seg.bayFt), count: seg.bays }));
    packInto('cap', recipe.cap.label, recipe.cap.stock, recipe.cap.nominal, pieces, 'cap', () => 'recipe.cap.stock');
  }

  const infill = recipe.infill;
  if (infill.kind === 'pickets') {
    // n = ceil((L + g) ÷ (w + g)) over each stretch of fence between terminal posts.
    const n = fenceSegments.reduce((a, { seg }) => a + Math.ceil((ftToIn(seg.lengthFt) + infill.gapIn) / (infill.widthIn + infill.gapIn) - EPS), 0);
    if (n) add({ sku: infill.sku, label: infill.label, group: 'infill', unit: 'each', takeoffQty: n, wasteKey: 'infill' });
    const tall = runResults.find((r) => r.heightIn > ftToIn(infill.lengthFt) + EPS);
    if (tall) warnings.push(`${tall.label}: ${tall.heightIn} in is taller than the ${infill.lengthFt} ft ${infill.label}.`);
  } else if (infill.kind === 'panels') {
    if (infill.cuttable) {
      const pieces = fenceSegments.map(({ seg }) => ({ lengthIn: ftToIn(seg.bayFt), count: seg.bays }));
      const packing = packStockCounts(pieces, [ftToIn(infill.widthFt)], 0);
      const tooWide = packing.tooLong.length > 0;
      if (tooWide) warnings.push(`Some bays are wider than the ${infill.widthFt} ft ${infill.label}; they take two pieces.`);
      const n = packing.boards.reduce((a, b) => a + b.count, 0) + packing.tooLong.reduce((a, p) => a + p.count * Math.ceil(p.lengthIn / ftToIn(infill.widthFt)), 0);
      if (n) add({ sku: infill.sku, label: infill.label, group: 'infill', unit: 'each', takeoffQty: n, wasteKey: 'infill', note: 'cut to the bays' });
    } else {
      if (totalBays) add({ sku: infill.sku, label: infill.label, group: 'infill', unit: 'each', takeoffQty: totalBays, wasteKey: 'infill' });
      const wide = fenceSegments.find(({ seg }) => seg.bayFt > infill.widthFt + EPS);
      if (wide) warnings.push(`Bays of ${wide.seg.bayFt} ft are wider than the ${infill.widthFt} ft ${infill.label}; set the spacing to the panel.`);
    }
    const tall = runResults.find((r) => r.heightIn > infill.heightIn + EPS);
    if (tall) warnings.push(`${tall.label}: ${tall.heightIn} in is taller than the ${infill.heightIn} in ${infill.label}.`);
  } else if (infill.kind === 'roll') {
    // Each run takes the lowest roll at least as high as its fence; feet of fence are pooled by roll.
    const rolls = [...infill.rolls].sort((a, b) => a.heightIn - b.heightIn);
    const tallest = rolls[rolls.length - 1];
    const feetBySku = new Map<string, { roll: (typeof rolls)[number]; ft: number }>();
    for (const r of runResults) {
      if (r.fenceFt <= EPS) continue;
      let roll = rolls.find((x) => x.heightIn >= r.heightIn - EPS);
      if (!roll) {
        roll = tallest;
        warnings.push(`${r.label}: no fabric roll of this style is ${r.heightIn} in high (the highest is ${tallest.heightIn} in, ${tallest.label}); add a roll that height or lower the fence.`);
      }
      const e = feetBySku.get(roll.sku) ?? { roll, ft: 0 };
      e.ft += r.fenceFt;
      feetBySku.set(roll.sku, e);
    }
    for (const { roll, ft } of feetBySku.values())
      add({ sku: roll.sku, label: roll.label, group: 'infill', unit: 'roll', takeoffQty: ft / infill.rollLengthFt, wasteKey: 'infill', note: `${roundTo(ft, 2)} ft of fence, ${roll.heightIn} in fabric` });
  }

  const holes = nodes.reduce((a, n) => a + n.count, 0);
  let concrete: Takeoff['concrete'] = null;
  if (recipe.hole.concrete) {
    const c = recipe.hole.concrete;
    const cuFt = cuInToCuFt(postGroups.reduce((a, g) => a + g.concreteCuInEach * g.count, 0));
    // Rounded up once, over the whole job, after waste: not bag by bag at each hole.
    const bags = withWaste(cuFt / c.bagYieldCuFt, recipe.wastePct.concrete);
    concrete = { cuFt: r4(cuFt), bagLb: c.bagLb, bagYieldCuFt: c.bagYieldCuFt, bags };
    if (holes) add({ sku: c.sku, label: c.label, group: 'concrete', unit: 'bag', takeoffQty: cuFt / c.bagYieldCuFt, wasteKey: 'concrete', buyQty: bags, note: `${roundTo(cuFt, 2)} ft³ at ${c.bagYieldCuFt} ft³ a ${c.bagLb} lb bag` });
  }
  let gravel: Takeoff['gravel'] = null;
  if (recipe.hole.gravel && recipe.hole.gravelDepthIn > 0) {
    const gv = recipe.hole.gravel;
    const cuFt = cuInToCuFt(postGroups.reduce((a, g) => a + g.gravelCuInEach * g.count, 0));
    const bags = withWaste(cuFt / gv.bagCuFt, recipe.wastePct.gravel);
    gravel = { cuFt: r4(cuFt), bags };
    if (holes) add({ sku: gv.sku, label: gv.label, group: 'gravel', unit: 'bag', takeoffQty: cuFt / gv.bagCuFt, wasteKey: 'gravel', buyQty: bags, note: `${roundTo(cuFt, 2)} ft³` });
  }

  const postCount = (k: PostKind) => nodes.reduce((a, n) => a + (n.kind === k ? n.count : 0), 0);
  const posts = { end: postCount('end'), corner: postCount('corner'), line: postCount('line'), gate: postCount('gate'), total: holes };
  const single = layout.gates.filter((g) => g.kind === 'single').length;
  const double = layout.gates.filter((g) => g.kind === 'double').length;
  const gates = { single, double, leaves: single + 2 * double };
  if (single) add({ sku: recipe.gates.single.sku, label: recipe.gates.single.label, group: 'gates', unit: 'each', takeoffQty: single, wasteKey: 'gates' });
  if (double && recipe.gates.double) add({ sku: recipe.gates.double.sku, label: recipe.gates.double.label, group: 'gates', unit: 'each', takeoffQty: double, wasteKey: 'gates' });

  const per: Record<string, number> = { bay: totalBays, gate: single + double, terminal_post: posts.end + posts.corner + posts.gate, post: posts.total, foot: fenceFt, job: 1 };
  for (const h of recipe.hardware) {
    const qty = h.qty * per[h.per];
    if (qty > 0) add({ sku: h.sku, label: h.label, group: 'hardware', unit: 'each', takeoffQty: qty, wasteKey: 'hardware' });
  }
  if (Object.keys(fields).length) return { ok: false, fields, warnings };

  const digHours = holes * rates.hole_hours;
  const crew: Record<LabourTask, number> = {
    posts: digHours + posts.total * rates.post_set_hours,
    rails_infill: fenceFt * rates.rails_infill_hours_per_ft,
    // Per gate, as the rate list has it: a double gate is one gate.
    gates: (gates.single + gates.double) * rates.gate_hours,
    setup: rates.setup_hours,
  };
  const labour: LabourLine[] = LABOUR_TASKS.map((task) => ({ task, crewHours: r4(crew[task]), manHours: r4(crew[task] * rates.crew_size) }));

  const rentals: RentalLine[] = recipe.rentals.map((rule) => {
    const hours = holes ? digHours : 0;
    const dayH = rates.rental_day_hours;
    let fullDays = Math.floor(hours / dayH + EPS);
    const rest = hours - fullDays * dayH;
    let halfDays = 0;
    if (rest > EPS) {
      if (rule.halfDaySku && rest <= dayH / 2 + EPS) halfDays = 1;
      else fullDays += 1;
    }
    return { label: rule.label, daySku: rule.daySku, halfDaySku: rule.halfDaySku, coversHours: r4(hours), fullDays, halfDays, days: fullDays + halfDays / 2 };
  });

  const totalLengthFt = runs.reduce((a, r) => a + r.lengthFt, 0);
  const quantities: Quantity[] = [
    { key: 'total_length', label: 'Length of the runs', value: r4(totalLengthFt), unit: 'ft' },
    { key: 'fence_length', label: 'Fence (gate openings excluded)', value: r4(fenceFt), unit: 'ft' },
    { key: 'bays', label: 'Bays', value: totalBays, unit: 'bays' },
    { key: 'posts', label: 'Posts', value: posts.total, unit: 'posts' },
    { key: 'holes', label: 'Holes', value: holes, unit: 'holes' },
    { key: 'gates', label: 'Gates', value: single + double, unit: 'gates' },
    ...(concrete ? [{ key: 'concrete_volume', label: 'Concrete', value: concrete.cuFt, unit: 'ft³' }, { key: 'concrete_bags', label: `Concrete, ${concrete.bagLb} lb bags`, value: concrete.bags, unit: 'bags' }] : []),
    ...(gravel ? [{ key: 'gravel_volume', label: 'Gravel', value: gravel.cuFt, unit: 'ft³' }, { key: 'gravel_bags', label: 'Gravel bags', value: gravel.bags, unit: 'bags' }] : []),
    { key: 'board_feet', label: 'Lumber', value: r4(materials.reduce((a, m) => a + (m.boardFeet ?? 0), 0)), unit: 'board ft' },
    ...labour.map((l) => ({ key: `labour_${l.task}`, label: `Labour: ${l.task.replace('_', ' and ')}`, value: l.manHours, unit: 'person-h' })),
    ...rentals.map((x) => ({ key: `rental_${x.daySku}`, label: x.label, value: x.days, unit: 'days' })),
  ];

  return {
    ok: true, runs: runResults, fenceFt: r4(fenceFt), totalLengthFt: r4(totalLengthFt), bays: totalBays, posts, holes, gates,
    postGroups: postGroups.map((g) => ({ ...g, concreteCuInEach: r4(g.concreteCuInEach), gravelCuInEach: r4(g.gravelCuInEach) })),
    concrete, gravel, materials, cutList, labour, rentals, quantities, warnings,
  };
}
