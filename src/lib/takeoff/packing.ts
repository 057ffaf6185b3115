/**
 * Cutting pieces from stock lengths by first-fit decreasing. A saw kerf is lost between
 * two pieces on a board, so a board of length C holds pieces p₁…pₙ when Σp + (n−1)·kerf ≤ C;
 * adding the kerf to every piece and to the board makes that an ordinary bin packing.
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

export interface Packing {
  boards: Board[];
  /** pieces longer than the longest stock (inches) */
  tooLong: number[];
}

const EPS = 1e-9;

/** First-fit decreasing into bins of one capacity; returns the bins as lists of item sizes. */
export function firstFitDecreasing(sizes: readonly number[], capacity: number): number[][] {
  return ffdIndices(sizes, capacity).map((bin) => bin.map((i) => sizes[i]));
}

/** FFD returning, per bin, the indices of the items it holds. */
function ffdIndices(sizes: readonly number[], capacity: number): number[][] {
  const order = sizes.map((_, i) => i).sort((a, b) => sizes[b] - sizes[a]);
  const bins: number[][] = [];
  const free: number[] = [];
  for (const idx of order) {
    const s = sizes[idx];
    let i = free.findIndex((f) => f + EPS >= s);
    if (i < 0) {
      bins.push([]);
      free.push(capacity);
      i = bins.length - 1;
    }
    bins[i].push(idx);
    free[i] -= s;
  }
  return bins;
}

/**
 * Packs pieces (inches) into the stock lengths (inches) a yard sells: FFD into the longest
 * stock, then each board is bought in the shortest stock length that still holds its pieces.
 */
export function packStock(piecesIn: readonly number[], stockIn: readonly number[], kerfIn = 0): Packing {
  const stocks = [...new Set(stockIn)].filter((s) => s > 0).sort((a, b) => a - b);
  const longest = stocks[stocks.length - 1] ?? 0;
  const tooLong = piecesIn.filter((p) => p > longest + EPS);
  const fit = piecesIn.filter((p) => p > 0 && p <= longest + EPS);
  const bins = ffdIndices(fit.map((p) => p + kerfIn), longest + kerfIn);
  const boards = bins.map((bin) => {
    const pieces = bin.map((i) => fit[i]);
    const usedIn = pieces.reduce((a, b) => a + b, 0) + kerfIn * (pieces.length - 1);
    const stock = stocks.find((s) => s + EPS >= usedIn) ?? longest;
    return { stockIn: stock, pieces, usedIn, offcutIn: Math.max(0, stock - usedIn) };
  });
  return { boards, tooLong };
}
