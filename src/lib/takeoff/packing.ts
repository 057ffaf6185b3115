/**
 * Cutting pieces from stock lengths by first-fit decreasing. A saw kerf is lost between
 * two pieces on a board, so a board of length C holds pieces p₁…pₙ when Σp + (n−1)·kerf ≤ C;
 * adding the kerf to every piece and to the board makes that an ordinary bin packing.
 *
 * A takeoff has few distinct lengths (one per post height and kind, one bay length per
 * stretch of fence) but can have tens of thousands of pieces, so the packing works on
 * lengths with counts and on runs of boards cut alike: the same boards as placing the pieces
 * one at a time, at a cost that grows with the number of distinct lengths, not of pieces.
 */

export interface Board {
  /** inches */
  stockIn: number;
  /** inches, longest first */
  pieces: number[];
  /** inches of the board used by pieces and kerfs */
  usedIn: number;
  /** inches left over */
  offcutIn: number;
}

/** Boards cut the same way. */
export interface BoardRun extends Board {
  /** boards cut this way, at least 1 */
  count: number;
}

export interface Packing {
  boards: Board[];
  /** pieces longer than the longest stock (inches) */
  tooLong: number[];
}

/** Pieces of one length. */
export interface PieceCount {
  /** inches */
  lengthIn: number;
  count: number;
}

export interface CountedPacking {
  /** in the order first-fit decreasing opens the boards */
  boards: BoardRun[];
  /** pieces longer than the longest stock */
  tooLong: PieceCount[];
}

const EPS = 1e-9;

/** Items of one size, and how many. */
interface SizeClass { size: number; count: number }

/** Bins with the same contents: `items` are [class index, how many] in the order placed. */
interface BinRun { items: [number, number][]; free: number; count: number }

/**
 * How many items of `size` go into a bin with `free` room, placed one at a time as first
 * fit would (the same float steps, so the same answer at the edges), and the room after:
 * at most `cap` items. Oversized items in a fresh bin are one per bin, as first fit opens
 * a bin for an item nothing holds.
 */
function fill(free: number, size: number, cap: number): { n: number; free: number } {
  let n = 0;
  while (n < cap && free + EPS >= size) { free -= size; n++; }
  return { n, free };
}

/**
 * First-fit decreasing over sizes with counts. For equal items first fit fills the first
 * bin with room, then the next, so every run of bins cut alike either takes as many as fit
 * in each of its bins, or splits into bins that do, one bin with the rest, and bins left
 * as they were. Each size class adds at most four runs, so the work is about the square of
 * the number of distinct sizes whatever the counts.
 */
function ffdRuns(classes: readonly SizeClass[], capacity: number): BinRun[] {
  const order = classes.map((_, i) => i).filter((i) => classes[i].count > 0).sort((a, b) => classes[b].size - classes[a].size);
  let runs: BinRun[] = [];
  for (const ci of order) {
    const { size } = classes[ci];
    let left = classes[ci].count;
    const next: BinRun[] = [];
    for (const run of runs) {
      if (left === 0) { next.push(run); continue; }
      const each = fill(run.free, size, left);
      if (each.n === 0) { next.push(run); continue; }
      const full = Math.min(run.count, Math.floor(left / each.n));
      if (full) next.push({ items: [...run.items, [ci, each.n]], free: each.free, count: full });
      left -= full * each.n;
      let untouched = run.count - full;
      if (untouched && left) {
        // left < each.n here: one bin takes the rest.
        const part = fill(run.free, size, left);
        next.push({ items: [...run.items, [ci, part.n]], free: part.free, count: 1 });
        left = 0;
        untouched--;
      }
      if (untouched) next.push({ ...run, count: untouched });
    }
    if (left) {
      // New bins: as many as fit in each, the rest in one more.
      const first = fill(capacity, size, left);
      const each = first.n || 1;
      const eachFree = first.n ? first.free : capacity - size;
      const full = Math.floor(left / each);
      if (full) next.push({ items: [[ci, each]], free: eachFree, count: full });
      left -= full * each;
      if (left) {
        const part = fill(capacity, size, left);
        next.push({ items: [[ci, part.n]], free: part.free, count: 1 });
      }
    }
    runs = next;
  }
  return runs;
}

/** Groups equal sizes into classes, keeping the first index of each size. */
function classesOf(pieces: readonly PieceCount[]): { lengths: number[]; counts: number[] } {
  const at = new Map<number, number>();
  const lengths: number[] = [];
  const counts: number[] = [];
  for (const p of pieces) {
    if (!(p.count > 0)) continue;
    const i = at.get(p.lengthIn);
    if (i === undefined) { at.set(p.lengthIn, lengths.length); lengths.push(p.lengthIn); counts.push(p.count); }
    else counts[i] += p.count;
  }
  return { lengths, counts };
}

const countsOf = (sizes: readonly number[]): PieceCount[] => sizes.map((lengthIn) => ({ lengthIn, count: 1 }));

/** First-fit decreasing into bins of one capacity; returns the bins as lists of item sizes. */
export function firstFitDecreasing(sizes: readonly number[], capacity: number): number[][] {
  const { lengths, counts } = classesOf(countsOf(sizes));
  const runs = ffdRuns(lengths.map((size, i) => ({ size, count: counts[i] })), capacity);
  return runs.flatMap((run) => {
    const bin = run.items.flatMap(([ci, n]) => Array.from({ length: n }, () => lengths[ci]));
    return Array.from({ length: run.count }, () => [...bin]);
  });
}

/**
 * Packs pieces of given lengths and counts (inches) into the stock lengths (inches) a yard
 * sells: FFD into the longest stock, then each board is bought in the shortest stock length
 * that still holds its pieces. Boards cut alike come back as one run with its count.
 */
export function packStockCounts(pieces: readonly PieceCount[], stockIn: readonly number[], kerfIn = 0): CountedPacking {
  const stocks = [...new Set(stockIn)].filter((s) => s > 0).sort((a, b) => a - b);
  const longest = stocks[stocks.length - 1] ?? 0;
  const { lengths, counts } = classesOf(pieces);
  const tooLong: PieceCount[] = [];
  const fit: SizeClass[] = [];
  const fitLength: number[] = [];
  lengths.forEach((len, i) => {
    if (len > longest + EPS) tooLong.push({ lengthIn: len, count: counts[i] });
    else if (len > 0) { fit.push({ size: len + kerfIn, count: counts[i] }); fitLength.push(len); }
  });
  const boards = ffdRuns(fit, longest + kerfIn).map((run): BoardRun => {
    const cut = run.items.flatMap(([ci, n]) => Array.from({ length: n }, () => fitLength[ci]));
    const usedIn = cut.reduce((a, b) => a + b, 0) + kerfIn * (cut.length - 1);
    const stock = stocks.find((s) => s + EPS >= usedIn) ?? longest;
    return { stockIn: stock, pieces: cut, usedIn, offcutIn: Math.max(0, stock - usedIn), count: run.count };
  });
  return { boards, tooLong };
}

/** packStockCounts for a plain list of pieces, one board per board bought. */
export function packStock(piecesIn: readonly number[], stockIn: readonly number[], kerfIn = 0): Packing {
  const stocks = stockIn.filter((s) => s > 0);
  const longest = stocks.length ? Math.max(...stocks) : 0;
  const packed = packStockCounts(countsOf(piecesIn), stockIn, kerfIn);
  const boards = packed.boards.flatMap(({ count, ...b }) => Array.from({ length: count }, () => ({ ...b, pieces: [...b.pieces] })));
  return { boards, tooLong: piecesIn.filter((p) => p > longest + EPS) };
}
