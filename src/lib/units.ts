/**
 * The one unit-conversion module. Lengths in code are feet or inches (named in each
 * signature), volumes cubic inches, cubic feet or cubic yards; nothing converts elsewhere.
 */

export const INCHES_PER_FOOT = 12;
export const CUBIC_INCHES_PER_CUBIC_FOOT = 1728;
export const CUBIC_FEET_PER_CUBIC_YARD = 27;
/** One board foot is 144 cubic inches (a board 12 in × 12 in × 1 in, nominal). */
export const CUBIC_INCHES_PER_BOARD_FOOT = 144;

/** inches → feet */
export const inToFt = (inches: number): number => inches / INCHES_PER_FOOT;
/** feet → inches */
export const ftToIn = (feet: number): number => feet * INCHES_PER_FOOT;
/** in³ → ft³ */
export const cuInToCuFt = (cuIn: number): number => cuIn / CUBIC_INCHES_PER_CUBIC_FOOT;
/** ft³ → yd³ */
export const cuFtToCuYd = (cuFt: number): number => cuFt / CUBIC_FEET_PER_CUBIC_YARD;

/** Volume of a cylinder, in³, from its diameter and height in inches (V = π r² h). */
export function cylinderCuIn(diameterIn: number, heightIn: number): number {
  const r = diameterIn / 2;
  return Math.PI * r * r * heightIn;
}

/**
 * Board feet of one piece: nominal thickness (in) × nominal width (in) × length (ft) ÷ 12.
 * Stock under 1 in thick counts as 1 in, as lumber is sold.
 */
export function boardFeet(nominalThicknessIn: number, nominalWidthIn: number, lengthFt: number): number {
  return (Math.max(1, nominalThicknessIn) * nominalWidthIn * lengthFt) / INCHES_PER_FOOT;
}

/**
 * Dressed (dry) size of a nominal softwood dimension, in inches: 1 → ¾, 5/4 → 1, 6/4 → 1¼,
 * 2 → 1½, 4 → 3½, 6 → 5½, 8 → 7¼, 10 → 9¼, 12 → 11¼ (the standard sizes of the softwood lumber
 * standard).
 */
export function actualLumberIn(nominalIn: number): number {
  if (nominalIn <= 1) return 0.75;
  if (nominalIn < 2) return nominalIn - 0.25;
  if (nominalIn <= 7) return nominalIn - 0.5;
  return nominalIn - 0.75;
}

/** "4×4" or "2x6" → [4, 4] / [2, 6]; null when it is not a nominal size. */
export function parseNominal(text: string): [number, number] | null {
  const m = /^\s*(\d+(?:\.\d+)?)\s*[x×]\s*(\d+(?:\.\d+)?)\s*$/i.exec(text);
  return m ? [Number(m[1]), Number(m[2])] : null;
}

/** A length for people: 61.5 → 5 ft 1½ in (nearest ⅛ in). */
export function formatFeetInches(inches: number): string {
  if (!Number.isFinite(inches)) return '—';
  const eighths = Math.round(inches * 8);
  const ft = Math.floor(eighths / 96);
  const rest = eighths - ft * 96;
  const whole = Math.floor(rest / 8);
  const frac = rest % 8;
  const FRACS = ['', '⅛', '¼', '⅜', '½', '⅝', '¾', '⅞'];
  const inPart = `${whole || (frac ? '' : '0')}${FRACS[frac]} in`;
  return ft ? (rest ? `${ft} ft ${inPart}` : `${ft} ft`) : inPart;
}

/** Rounds for display or storage without inventing precision (DECIMAL columns take 3 or 4 places). */
export function roundTo(value: number, places: number): number {
  const f = 10 ** places;
  return Math.round((value + Number.EPSILON) * f) / f;
}
