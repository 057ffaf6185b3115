/**
 * Small, robust statistics for calibration and the margin reports. Pure; checked against
 * simple-statistics in the tests.
 */

function sorted(values: readonly number[]): number[] {
  for (const v of values) if (!Number.isFinite(v)) throw new Error(`not a finite number: ${v}`);
  return [...values].sort((a, b) => a - b);
}

/**
 * The q-quantile by linear interpolation between order statistics (Hyndman & Fan type 7,
 * the default of R and NumPy): h = (n − 1)q.
 */
export function quantile(values: readonly number[], q: number): number {
  if (values.length === 0) throw new Error('quantile of no values');
  if (q < 0 || q > 1) throw new Error(`q must be in [0, 1], got ${q}`);
  const s = sorted(values);
  const h = (s.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.ceil(h);
  return s[lo] + (h - lo) * (s[hi] - s[lo]);
}

export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}

export function mean(values: readonly number[]): number {
  if (values.length === 0) throw new Error('mean of no values');
  return values.reduce((s, v) => s + v, 0) / values.length;
}

export interface Spread {
  n: number;
  median: number;
  q1: number;
  q3: number;
  iqr: number;
  min: number;
  max: number;
}

/** Median and interquartile range: what the reports show instead of a bare mean. */
export function spread(values: readonly number[]): Spread {
  const s = sorted(values);
  const q1 = quantile(s, 0.25);
  const q3 = quantile(s, 0.75);
  return { n: s.length, median: quantile(s, 0.5), q1, q3, iqr: q3 - q1, min: s[0], max: s[s.length - 1] };
}

/**
 * Weighted median: the smallest value at which the cumulative weight reaches half the total
 * (interpolating when it lands exactly on a half). Used for recency-weighted estimates.
 */
export function weightedMedian(items: readonly { value: number; weight: number }[]): number {
  if (items.length === 0) throw new Error('weighted median of no values');
  const s = [...items].filter((i) => i.weight > 0).sort((a, b) => a.value - b.value);
  if (s.length === 0) throw new Error('weighted median with no positive weight');
  const total = s.reduce((t, i) => t + i.weight, 0);
  let acc = 0;
  for (let i = 0; i < s.length; i++) {
    acc += s[i].weight;
    if (Math.abs(acc - total / 2) < 1e-12 && i + 1 < s.length) return (s[i].value + s[i + 1].value) / 2;
    if (acc > total / 2) return s[i].value;
  }
  return s[s.length - 1].value;
}
