import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { firstFitDecreasing, packStock } from '../../../src/lib/takeoff/packing';

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
