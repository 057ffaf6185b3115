import { describe, expect, it } from 'vitest';
import { create, all } from 'mathjs';
import { actualLumberIn, boardFeet, cuFtToCuYd, cuInToCuFt, cylinderCuIn, formatFeetInches, parseNominal } from '../../../src/lib/units';

const math = create(all);
/** mathjs, a general-purpose units library from npm, as an independent converter. */
const convert = (value: number, from: string, to: string) => math.unit(value, from).toNumber(to);

describe('board feet', () => {
  // Definition: nominal thickness (in) × nominal width (in) × length (ft) ÷ 12; 1 BF = 144 in³.
  // Source: US Navy, Engineering Aid Basic, ch. 6; USDA Forest Products Laboratory, Wood Handbook
  // FPL-GTR-190 (2010), ch. 6 "Purchase of Lumber" (wording from memory).
  it.each([
    [2, 4, 8, 5.333],
    [4, 4, 8, 10.667],
    [2, 6, 16, 16],
    [4, 4, 10, 13.333],
  ])('%i×%i×%i ft = %f BF (worked values, by arithmetic from the definition)', (t, w, l, bf) => {
    expect(boardFeet(t, w, l)).toBeCloseTo(bf, 3);
  });

  it('one board foot is 144 in³, which mathjs converts to 2.359737216e-3 m³ (NIST SP 811 App. B.8, from memory)', () => {
    const inCubicInches = boardFeet(1, 12, 1) * 144;
    expect(inCubicInches).toBe(144);
    expect(convert(inCubicInches, 'in^3', 'm^3')).toBeCloseTo(2.359737216e-3, 12);
  });

  it('counts stock under 1 in thick as 1 in, as lumber is sold (Wood Handbook, ch. 6)', () => {
    expect(boardFeet(0.75, 6, 6)).toBe(boardFeet(1, 6, 6));
    expect(boardFeet(1, 6, 6)).toBe(3);
  });
});

describe('nominal and actual softwood sizes', () => {
  // NIST Voluntary Product Standard PS 20, American Softwood Lumber Standard, table of
  // standard dressed (dry) sizes (table number from memory).
  it.each([
    ['4×4', 3.5, 3.5],
    ['2×6', 1.5, 5.5],
    ['2×4', 1.5, 3.5],
    ['1×6', 0.75, 5.5],
  ])('a nominal %s is %f × %f in dressed', (nominal, t, w) => {
    const [nt, nw] = parseNominal(nominal)!;
    expect([actualLumberIn(nt), actualLumberIn(nw)]).toEqual([t, w]);
  });

  it('5/4 and 6/4 nominal thicknesses dress to 1 and 1¼ in (PS 20, from memory)', () => {
    expect([1.25, 1.5].map(actualLumberIn)).toEqual([1, 1.25]);
  });

  it('8, 10 and 12 in nominal widths dress to 7¼, 9¼ and 11¼ in (PS 20)', () => {
    expect([8, 10, 12].map(actualLumberIn)).toEqual([7.25, 9.25, 11.25]);
  });
});

describe('volumes', () => {
  it('27 ft³ to the yd³ and 1728 in³ to the ft³ (NIST Handbook 44 appendices, from memory; mathjs agrees exactly)', () => {
    expect(cuFtToCuYd(27)).toBe(1);
    expect(convert(1, 'yd^3', 'ft^3')).toBeCloseTo(27, 12);
    expect(cuInToCuFt(1728)).toBe(1);
    expect(convert(1728, 'in^3', 'ft^3')).toBeCloseTo(1, 12);
  });

  it.each([[10, 24], [6, 18], [12, 36], [8, 30]])('a %f in × %f in cylinder, V = π r² h (geometry), matches mathjs', (d, h) => {
    const ours = cuInToCuFt(cylinderCuIn(d, h));
    const theirs = math.evaluate(`pi * (${d / 2} in)^2 * ${h} in`).toNumber('ft^3');
    expect(ours).toBeCloseTo(theirs, 10);
  });

  it('the worked hole: 10 in Ø, 24 in of concrete around a 4×4 holds 1590.96 in³ = 0.9207 ft³ (by arithmetic)', () => {
    const cuIn = cylinderCuIn(10, 24) - 3.5 * 3.5 * 24;
    expect(cuIn).toBeCloseTo(1590.96, 2);
    expect(cuInToCuFt(cuIn)).toBeCloseTo(0.9207, 4);
  });
});

describe('lengths for people', () => {
  it('formats feet and inches to the eighth', () => {
    expect(formatFeetInches(59.875)).toBe('4 ft 11⅞ in');
    expect(formatFeetInches(60)).toBe('5 ft');
    expect(formatFeetInches(18)).toBe('1 ft 6 in');
    expect(formatFeetInches(0.5)).toBe('½ in');
    expect(formatFeetInches(Number.NaN)).toBe('—');
  });
});
