import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { firstFitDecreasing, packStock, packStockCounts, type PieceCount } from '../../../src/lib/takeoff/packing';

/** The fewest bins that hold the items, by trying every assignment (small inputs only). */
function optimum(sizes: number[], capacity: number): number {
  const items = [...sizes].sort((a, b) => b - a);
  let best = items.length;
  const loads: number[] = [];
  const place = (i: number) => {
    if (loads.length >= best) return;
    if (i === items.length) { best = loads.length; return; }
    const tried = new Set<number>();
    for (let b = 0; b < loads.length; b++) {
      if (loads[b] + items[i] <= capacity && !tried.has(loads[b])) {
        tried.add(loads[b]);
        loads[b] += items[i];
        place(i + 1);
        loads[b] -= items[i];
      }
    }
    loads.push(items[i]);
    place(i + 1);
    loads.pop();
  };
  place(0);
  return best;
}

describe('first-fit decreasing', () => {
  // G. Dósa, "The tight bound of first fit decreasing bin-packing algorithm is
  // FFD(I) ≤ 11/9 OPT(I) + 6/9", ESCAPE 2007, LNCS 4614.
  it('never uses more than 11/9 · OPT + 6/9 bins (checked against a brute-force optimum)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 100 }), { minLength: 1, maxLength: 9 }), (sizes) => {
        const ffd = firstFitDecreasing(sizes, 100).length;
        const opt = optimum(sizes, 100);
        expect(ffd).toBeGreaterThanOrEqual(opt);
        expect(9 * ffd).toBeLessThanOrEqual(11 * opt + 6);
      }),
      { numRuns: 300 },
    );
  });
});

describe('cutting from stock lengths', () => {
  const stock = [96, 120, 144, 192];

  it('the buy list always covers the cut list, kerf included, and buys only stock lengths', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 6, max: 192, noNaN: true }), { minLength: 0, maxLength: 40 }),
        fc.constantFrom(0, 0.125, 0.25),
        (pieces, kerf) => {
          const p = packStock(pieces, stock, kerf);
          expect(p.tooLong).toEqual([]);
          const placed = p.boards.flatMap((b) => b.pieces).sort((a, b) => a - b);
          expect(placed).toEqual([...pieces].sort((a, b) => a - b));
          for (const b of p.boards) {
            expect(stock).toContain(b.stockIn);
            expect(b.pieces.reduce((a, x) => a + x, 0) + kerf * (b.pieces.length - 1)).toBeLessThanOrEqual(b.stockIn + 1e-9);
            expect(b.offcutIn).toBeGreaterThanOrEqual(0);
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  it('cuts two 5 ft posts from a 10 ft board when the kerf is allowed for', () => {
    const half = (120 - 0.125) / 2;
    const p = packStock([half, half], stock, 0.125);
    expect(p.boards).toHaveLength(1);
    expect(p.boards[0].stockIn).toBe(120);
  });

  it('reports pieces longer than any stock instead of dropping them', () => {
    expect(packStock([200, 50], stock, 0.125).tooLong).toEqual([200]);
  });
});

/**
 * First-fit decreasing placing one piece at a time, as the packing did before it worked on
 * counts: the reference the counted packing must never do worse than.
 */
function ffdOneAtATime(sizes: readonly number[], capacity: number): number[][] {
  const order = sizes.map((_, i) => i).sort((a, b) => sizes[b] - sizes[a]);
  const bins: number[][] = [];
  const free: number[] = [];
  for (const idx of order) {
    const s = sizes[idx];
    let i = free.findIndex((f) => f + 1e-9 >= s);
    if (i < 0) { bins.push([]); free.push(capacity); i = bins.length - 1; }
    bins[i].push(s);
    free[i] -= s;
  }
  return bins;
}

const expand = (pieces: readonly PieceCount[]) => pieces.flatMap((p) => Array.from({ length: p.count }, () => p.lengthIn));
const sorted = (xs: number[]) => [...xs].sort((a, b) => a - b);

describe('packing pieces by count', () => {
  const stock = [96, 120, 144, 192];
  // A few distinct lengths, each many times over, as a takeoff's posts, rails and caps are.
  const lengths = fc.oneof(fc.double({ min: 6, max: 192, noNaN: true }), fc.integer({ min: 6, max: 192 }), fc.constantFrom(48, 59.9375, 64, 95.875, 96, 119.875));
  const pieceCounts = fc.array(fc.record({ lengthIn: lengths, count: fc.integer({ min: 0, max: 120 }) }), { minLength: 0, maxLength: 8 });
  const kerfs = fc.constantFrom(0, 0.125, 0.25);

  it('uses no more boards than first-fit decreasing one piece at a time, and cuts every piece exactly once (property)', () => {
    fc.assert(
      fc.property(pieceCounts, kerfs, (pieces, kerf) => {
        const p = packStockCounts(pieces, stock, kerf);
        const flat = expand(pieces);
        const reference = ffdOneAtATime(flat.map((x) => x + kerf), 192 + kerf);
        const boards = p.boards.reduce((a, b) => a + b.count, 0);
        expect(boards).toBeLessThanOrEqual(reference.length);
        // Every piece once: the boards' pieces, each board as often as it is cut, are the pieces asked for.
        expect(sorted(p.boards.flatMap((b) => expand(b.pieces.map((x) => ({ lengthIn: x, count: b.count })))))).toEqual(sorted(flat));
        expect(p.tooLong).toEqual([]);
        for (const b of p.boards) {
          expect(b.count).toBeGreaterThanOrEqual(1);
          expect(stock).toContain(b.stockIn);
          expect(b.pieces.reduce((a, x) => a + x, 0) + kerf * (b.pieces.length - 1)).toBeLessThanOrEqual(b.stockIn + 1e-9);
        }
        // The work follows the distinct lengths, not the pieces: at most four runs of boards cut alike per length.
        expect(p.boards.length).toBeLessThanOrEqual(4 * new Set(pieces.filter((x) => x.count > 0).map((x) => x.lengthIn)).size);
      }),
      { numRuns: 300 },
    );
  });

  it('cuts the same boards as placing the pieces one at a time (property)', () => {
    fc.assert(
      fc.property(pieceCounts, kerfs, (pieces, kerf) => {
        const counted = packStockCounts(pieces, stock, kerf).boards.flatMap((b) => Array.from({ length: b.count }, () => b.pieces.map((x) => x + kerf)));
        expect(counted).toEqual(ffdOneAtATime(expand(pieces).map((x) => x + kerf), 192 + kerf));
      }),
      { numRuns: 300 },
    );
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 100 }), { maxLength: 60 }), (sizes) => {
        expect(firstFitDecreasing(sizes, 100)).toEqual(ffdOneAtATime(sizes, 100));
      }),
      { numRuns: 300 },
    );
  });

  it('packs 480,000 rails of three lengths into whole boards without placing them one by one', () => {
    // 60 runs of 2,000 ft at 2 ft bays with 8 rails a bay: the most rails the takeoff's limits allow.
    const pieces = [{ lengthIn: 24, count: 400_000 }, { lengthIn: 23.9, count: 79_000 }, { lengthIn: 11.5, count: 1_000 }];
    const p = packStockCounts(pieces, [480], 0.125);
    const boards = p.boards.reduce((a, b) => a + b.count, 0);
    // With the kerf each 24 in piece takes 24.125 in of a 480.125 in board (a board holds n pieces
    // and n − 1 kerfs), so 19 fit and leave 21.75 in; the 20th would need 24.125. 400,000 ÷ 19 is
    // 21,052 boards and 12 pieces over. The 11.5 in pieces then go one each into the first
    // thousand boards' 21.75 in ends, in first-fit order.
    expect(p.boards[0]).toMatchObject({ stockIn: 480, count: 1_000, pieces: [...Array(19).fill(24), 11.5] });
    expect(p.boards[1]).toMatchObject({ stockIn: 480, count: 21_052 - 1_000, pieces: Array(19).fill(24) });
    expect(p.boards.reduce((a, b) => a + b.count * b.pieces.length, 0)).toBe(480_000);
    // No fewer boards than the pieces' length and kerfs need, and no board wasted (every board but the last few full).
    const lowerBound = Math.ceil(pieces.reduce((a, x) => a + x.count * (x.lengthIn + 0.125), 0) / 480.125);
    expect(boards).toBeGreaterThanOrEqual(lowerBound);
    expect(boards).toBeLessThanOrEqual(Math.ceil(lowerBound * 1.06));
    expect(p.boards.length).toBeLessThanOrEqual(12);
  });

  it('reports pieces longer than any stock with their count', () => {
    expect(packStockCounts([{ lengthIn: 200, count: 3 }, { lengthIn: 50, count: 2 }, { lengthIn: 200, count: 1 }], stock, 0.125).tooLong).toEqual([{ lengthIn: 200, count: 4 }]);
  });
});
