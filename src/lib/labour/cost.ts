import { dinero, multiply, toSnapshot, transformScale, halfAwayFromZero } from 'dinero.js';
import { USD } from 'dinero.js/currencies';

/** Hours are logged to the hundredth (7.25 h); burden percentages to four decimals. */
export const HOURS_SCALE = 2;
const BURDEN_SCALE = 4;

export interface LabourInput {
  /** hours worked */
  hours: number;
  /** hourly wage, cents */
  wageCents: number;
  /** labour burden, percent of wage (28 = 28 %): payroll taxes, insurance, benefits */
  burdenPct: number;
}

function scaled(value: number, scale: number, what: string): number {
  const n = Math.round(value * 10 ** scale);
  if (!Number.isSafeInteger(n) || Math.abs(n - value * 10 ** scale) > 1e-6) throw new Error(`${what} must have at most ${scale} decimals, got ${value}`);
  return n;
}

/**
 * Rounding step "labour cost": hours × wage × (1 + burden ÷ 100), computed exactly, then
 * rounded half away from zero to the cent once per time entry.
 */
export function labourCostCents({ hours, wageCents, burdenPct }: LabourInput): number {
  if (!Number.isSafeInteger(wageCents) || wageCents < 0) throw new Error(`wage must be whole cents, got ${wageCents}`);
  const h = scaled(hours, HOURS_SCALE, 'hours');
  const b = scaled(burdenPct, BURDEN_SCALE, 'burden');
  // 1 + b/100 at scale 6: 28 % → 1.280000
  const factor = 10 ** (BURDEN_SCALE + 2) + b;
  if (!Number.isSafeInteger(wageCents * h * factor)) throw new Error('labour cost is out of range');
  const wage = dinero({ amount: wageCents, currency: USD });
  const cost = multiply(multiply(wage, { amount: h, scale: HOURS_SCALE }), { amount: factor, scale: BURDEN_SCALE + 2 });
  return toSnapshot(transformScale(cost, 2, halfAwayFromZero)).amount;
}

/** The burdened hourly rate, for showing what an hour costs (rounded the same way). */
export function burdenedRateCents(wageCents: number, burdenPct: number): number {
  return labourCostCents({ hours: 1, wageCents, burdenPct });
}
