import { median, spread, type Spread } from '../stats/robust.ts';
import { MIN_JOBS } from './backtest.ts';

/** One material a finished job's bid priced and its receipts paid for. */
export interface UnitCostRow {
  sku: string;
  name: string;
  jobId: number;
  /** cents per unit, as the bid priced it */
  bidUnitCostCents: number;
  /** units bought (returns left out) and what they cost, cents */
  paidQty: number;
  paidCents: number;
}

export interface UnitCostCheck {
  sku: string;
  name: string;
  jobs: number;
  /** cents per unit: the median bid and the median paid (each job's paid ÷ its units) */
  bidMedianCents: number;
  paidMedianCents: number;
  /** paid ÷ bid per job */
  ratio: Spread;
  /** the price book's unit cost today, cents (null when the item is gone) */
  bookCents: number | null;
  /** paid ÷ the price book's unit cost today, per job (null without a book price) */
  bookRatio: Spread | null;
  /** A unit cost for the price book: its value today × the median of paid ÷ book; null when the jobs are too few (see reason). */
  suggestedCents: number | null;
  reason: string | null;
}

/** Rounding step "unit cost": a median of cents per unit to the cent, half away from zero. */
const toCent = (x: number) => Math.sign(x) * Math.round(Math.abs(x));

/**
 * Unit costs paid on finished jobs against what their bids priced, item by item, with the
 * price book's value today beside them (receipts already feed the price book; this shows
 * whether the bids were priced low or high). Where at least `minJobs` jobs bought the item,
 * a suggested book price: today's book price × the median of each job's paid unit cost ÷
 * that book price (a median, so one odd receipt hardly moves it).
 */
export function unitCostChecks(rows: readonly UnitCostRow[], book: ReadonlyMap<string, number>, minJobs = MIN_JOBS): UnitCostCheck[] {
  const by = new Map<string, UnitCostRow[]>();
  for (const r of rows) if (r.paidQty > 0 && r.bidUnitCostCents > 0) by.set(r.sku, [...(by.get(r.sku) ?? []), r]);
  return [...by.entries()]
    .map(([sku, rs]) => {
      const paid = rs.map((r) => r.paidCents / r.paidQty);
      const bid = rs.map((r) => r.bidUnitCostCents);
      const bookCents = book.get(sku) ?? null;
      const vsBook = bookCents && bookCents > 0 ? paid.map((p) => p / bookCents) : null;
      const enough = rs.length >= minJobs;
      return {
        sku, name: rs[0].name, jobs: rs.length, bidMedianCents: toCent(spread(bid).median), paidMedianCents: toCent(spread(paid).median),
        ratio: spread(rs.map((r, i) => paid[i] / r.bidUnitCostCents)), bookCents,
        bookRatio: vsBook ? spread(vsBook) : null,
        // Rounding step "unit cost": to the cent, half away from zero.
        suggestedCents: vsBook && enough ? toCent(bookCents! * median(vsBook)) : null,
        reason: !vsBook ? 'Not in the price book.' : enough ? null : `Bought on ${rs.length} finished job${rs.length === 1 ? '' : 's'}; at least ${minJobs} are needed.`,
      };
    })
    .sort((a, b) => a.sku.localeCompare(b.sku));
}
