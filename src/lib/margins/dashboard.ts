import type { StyleMargin } from './by-style.ts';

/** The calendar quarter a day falls in, as an inclusive date range and a label ("Q2 2026"). */
export function quarterOf(today: string): { from: string; to: string; label: string } {
  const y = Number(today.slice(0, 4));
  const q = Math.floor((Number(today.slice(5, 7)) - 1) / 3);
  const first = q * 3 + 1;
  const lastDay = new Date(Date.UTC(y, first + 2, 0)).getUTCDate();
  return { from: `${y}-${String(first).padStart(2, '0')}-01`, to: `${y}-${String(first + 2).padStart(2, '0')}-${lastDay}`, label: `Q${q + 1} ${y}` };
}

/** The day a year before, for "the last twelve months". */
export function yearBefore(today: string): string {
  const d = new Date(`${today}T00:00:00Z`);
  d.setUTCFullYear(d.getUTCFullYear() - 1);
  d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}

/** Jobs with a measured length a style needs before it is called best or worst (one job is an anecdote). */
export const BEST_WORST_MIN_JOBS = 2;

/**
 * The styles that earn the most and the least gross profit per linear foot, among styles
 * with at least `minJobs` jobs with a measured length. The dashboard and the margins screen
 * both name them by this rule.
 */
export function bestAndWorst(styles: readonly StyleMargin[], minJobs = BEST_WORST_MIN_JOBS): { best: StyleMargin | null; worst: StyleMargin | null; ranked: StyleMargin[] } {
  const ranked = styles
    .filter((s) => s.styleId !== null && s.jobsWithFeet >= minJobs && s.grossProfitPerFtCents !== null)
    .sort((a, b) => b.grossProfitPerFtCents! - a.grossProfitPerFtCents! || a.styleName.localeCompare(b.styleName));
  return { best: ranked[0] ?? null, worst: ranked.length > 1 ? ranked[ranked.length - 1] : null, ranked };
}
