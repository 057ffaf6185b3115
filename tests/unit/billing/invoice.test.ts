import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { all, create } from 'mathjs';
import currencyCodes from 'currency-codes';
import { computeInvoice, formatInvoiceNumber, paidStatus, type LineInput } from '../../../src/lib/billing/invoice';
import { contractLines, contractToDate, depositAmount, depositCap, finalAmount, overContract, progressAmount } from '../../../src/lib/billing/contract';
import { extend, parseMoney, percentOf, split } from '../../../src/lib/billing/money';
import { applyPayment, refundSplit } from '../../../src/lib/billing/payments';
import { MINOR_UNITS, toStripeAmount, fromStripeAmount } from '../../../src/lib/billing/stripe-amount';

// mathjs with 64-digit decimals as an outside reference for "amount × rate, rounded half away from zero".
const math = create(all, { number: 'BigNumber', precision: 64 });
function reference(cents: number, pct: number): number {
  const exact = math.evaluate(`${cents} * ${pct} / 100`) as unknown as { abs(): { toDecimalPlaces(n: number, r: number): { toNumber(): number } }; isNegative(): boolean };
  // decimal.js rounding 4 = ROUND_HALF_UP, which in decimal.js means half away from zero.
  const r = exact.abs().toDecimalPlaces(0, 4).toNumber();
  return exact.isNegative() ? -r : r;
}

const line = (amount: number, category: LineInput['category'] = 'other', kind: LineInput['kind'] = 'contract'): LineInput => ({ kind, category, description: 'x', quantity: 1, unitPriceCents: amount });

describe('sales tax, rounded once on the invoice', () => {
  it('matches worked examples [calc]', () => {
    // $1,100.00 × 8.25 % = $90.75 exactly.
    expect(percentOf(110_000, 8.25)).toBe(9_075);
    // $19.99 × 7.375 % = $1.4742625 → $1.47.
    expect(percentOf(1_999, 7.375)).toBe(147);
    // $0.50 × 9 % = $0.045 → half away from zero gives $0.05 (banker's rounding would give $0.04).
    expect(percentOf(50, 9)).toBe(5);
    expect(percentOf(-50, 9)).toBe(-5);
  });

  it('taxes the sum of the taxable lines, not each line: two $0.50 lines at 9 % owe $0.09 [calc]', () => {
    const t = computeInvoice({ lines: [line(50, 'material', 'extra'), line(50, 'material', 'extra')], taxMode: 'all', taxRatePct: 9, retainagePct: 0 });
    expect(t.taxCents).toBe(9);
  });

  it('follows the tax mode: materials only, everything, or none', () => {
    const lines = [line(100_000, 'material', 'extra'), line(50_000, 'labour', 'extra')];
    expect(computeInvoice({ lines, taxMode: 'materials', taxRatePct: 10, retainagePct: 0 }).taxCents).toBe(10_000);
    expect(computeInvoice({ lines, taxMode: 'all', taxRatePct: 10, retainagePct: 0 }).taxCents).toBe(15_000);
    expect(computeInvoice({ lines, taxMode: 'none', taxRatePct: 10, retainagePct: 0 }).taxCents).toBe(0);
    const forced = computeInvoice({ lines: [{ ...line(50_000, 'labour', 'extra'), taxable: true }], taxMode: 'materials', taxRatePct: 10, retainagePct: 0 });
    expect(forced.taxCents).toBe(5_000);
  });

  it('agrees with mathjs (64-digit decimals) for any amount and rate', () => {
    fc.assert(fc.property(fc.integer({ min: -10_000_000_00, max: 10_000_000_00 }), fc.integer({ min: 0, max: 250_000 }), (cents, rate) => {
      const pct = rate / 10_000;
      expect(percentOf(cents, pct)).toBe(reference(cents, pct));
    }), { numRuns: 400 });
  });

  it('extends quantity × unit price to the cent: 2.5 ft at $12.35 = $30.875 → $30.88 [calc]', () => {
    expect(extend(2.5, 1_235)).toBe(3_088);
    expect(extend(0.001, 1)).toBe(0);
  });
});

describe('progress billing and retainage', () => {
  it('worked example: $50,000 contract, 40 % complete, $12,500 billed before, 10 % retainage [calc; retainage of 5–10 % is common practice, no source]', () => {
    const p = progressAmount({ contractCents: 5_000_000, percentComplete: 40, billedBeforeCents: 1_250_000 });
    expect(p).toEqual({ earnedCents: 2_000_000, billCents: 750_000 });
    const t = computeInvoice({ lines: [line(p.billCents)], taxMode: 'none', taxRatePct: 0, retainagePct: 10 });
    expect(t.retainageHeldCents).toBe(75_000);
    expect(t.totalCents).toBe(675_000);
  });

  it('change orders raise the contract the percent applies to [calc]', () => {
    const contract = contractToDate(1_200_000, [150_000, 35_000]);
    expect(contract).toBe(1_385_000);
    expect(progressAmount({ contractCents: contract, percentComplete: 50, billedBeforeCents: 300_000 }).billCents).toBe(392_500);
  });

  it('bills exactly the contract over any run of percents, and the final releases exactly what was held', () => {
    fc.assert(fc.property(
      fc.integer({ min: 100_00, max: 5_000_000_00 }),
      fc.array(fc.integer({ min: 1, max: 9_999 }), { minLength: 1, maxLength: 8 }),
      fc.integer({ min: 0, max: 15 }),
      (contract, steps, retainage) => {
        const pcts = [...new Set(steps)].sort((a, b) => a - b).map((s) => s / 100);
        let billed = 0;
        let held = 0;
        for (const pct of pcts) {
          const { billCents } = progressAmount({ contractCents: contract, percentComplete: pct, billedBeforeCents: billed });
          if (billCents <= 0) continue;
          const t = computeInvoice({ lines: [line(billCents)], taxMode: 'none', taxRatePct: 0, retainagePct: retainage });
          billed += t.contractBilledCents;
          held += t.retainageHeldCents;
        }
        const f = finalAmount({ contractCents: contract, billedBeforeCents: billed, retainageHeldCents: held, retainageReleasedCents: 0 });
        expect(billed + f.balanceCents).toBe(contract);
        expect(f.retainageCents).toBe(held);
        expect(overContract({ contractCents: contract, billedBeforeCents: billed, thisBillCents: f.balanceCents })).toBe(0);
        expect(overContract({ contractCents: contract, billedBeforeCents: billed, thisBillCents: f.balanceCents + 1 })).toBe(1);
      },
    ), { numRuns: 300 });
  });

  it('holds retainage on contract and change-order lines, never on extras or the release', () => {
    const t = computeInvoice({ lines: [line(100_000), line(20_000, 'other', 'change_order'), line(5_000, 'labour', 'extra'), line(3_000, 'other', 'retainage_release')], taxMode: 'all', taxRatePct: 5, retainagePct: 10 });
    expect(t.retainageHeldCents).toBe(12_000);
    expect(t.retainageReleasedCents).toBe(3_000);
    expect(t.contractBilledCents).toBe(125_000);
    expect(t.taxableCents).toBe(125_000);
    expect(t.totalCents).toBe(128_000 + 6_250 - 12_000);
  });
});

describe('deposits', () => {
  it('caps a deposit at $1,000 or 10 % of the contract, whichever is less (Cal. Bus. & Prof. Code §7159.5(a)(3))', () => {
    const ca = { pct: 10, cents: 100_000 };
    expect(depositCap(800_000, ca)).toBe(80_000);
    expect(depositCap(1_000_000, ca)).toBe(100_000);
    expect(depositCap(1_500_000, ca)).toBe(100_000);
    expect(depositCap(1_500_000, { pct: null, cents: null })).toBeNull();
    expect(depositCap(1_500_000, { pct: 30, cents: null })).toBe(450_000);
  });
  it('asks a percent (rounded once) or an amount', () => {
    expect(depositAmount(1_234_567, { pct: 10, cents: null })).toBe(123_457);
    expect(depositAmount(1_234_567, { pct: null, cents: 50_000 })).toBe(50_000);
  });
  it('splits a contract line into materials and the rest so the parts sum exactly', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 10_000_000_00 }), fc.integer({ min: 1, max: 10_000_000 }), fc.integer({ min: 0, max: 10_000_000 }), (amount, mat, other) => {
      const ls = contractLines({ amountCents: amount, description: 'Deposit', taxOnMaterials: true, estimate: { materialCents: mat, otherCents: other } });
      expect(ls.reduce((a, l) => a + l.unitPriceCents, 0)).toBe(amount);
    }));
    expect(split(100, [1, 1, 1])).toEqual([34, 33, 33]);
  });
});

describe('payments', () => {
  it('applies what fits, refuses an overpayment, or keeps the excess as credit', () => {
    expect(applyPayment({ totalCents: 10_000, paidCents: 4_000, amountCents: 6_000, asCredit: false, open: true })).toEqual({ ok: true, appliedCents: 6_000, creditCents: 0 });
    expect(applyPayment({ totalCents: 10_000, paidCents: 4_000, amountCents: 6_001, asCredit: false, open: true })).toMatchObject({ ok: false, reason: 'OVERPAYMENT', balanceCents: 6_000 });
    expect(applyPayment({ totalCents: 10_000, paidCents: 4_000, amountCents: 7_000, asCredit: true, open: true })).toEqual({ ok: true, appliedCents: 6_000, creditCents: 1_000 });
    expect(applyPayment({ totalCents: 10_000, paidCents: 0, amountCents: 0, asCredit: false, open: true })).toMatchObject({ ok: false, reason: 'NOT_POSITIVE' });
    expect(applyPayment({ totalCents: 10_000, paidCents: 0, amountCents: 10, asCredit: false, open: false })).toMatchObject({ ok: false, reason: 'NOT_OPEN' });
  });
  it('never lets applied payments pass the total', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 1e9 }), fc.array(fc.integer({ min: 1, max: 1e8 }), { maxLength: 20 }), fc.boolean(), (total, amounts, asCredit) => {
      let paid = 0;
      let credit = 0;
      for (const a of amounts) {
        const r = applyPayment({ totalCents: total, paidCents: paid, amountCents: a, asCredit, open: paid < total });
        if (r.ok) { paid += r.appliedCents; credit += r.creditCents; expect(r.appliedCents + r.creditCents).toBe(a); }
      }
      expect(paid).toBeLessThanOrEqual(total);
      expect(paidStatus(total, paid)).toBe(paid === 0 ? 'issued' : paid === total ? 'paid' : 'partly_paid');
      if (!asCredit) expect(credit).toBe(0);
    }));
  });
  it('refunds credit first, and never more than is left', () => {
    expect(refundSplit({ appliedCents: 10_000, creditCents: 500, refundedCents: 0 }, 800)).toEqual({ fromCreditCents: 500, fromInvoiceCents: 300 });
    expect(refundSplit({ appliedCents: 10_000, creditCents: 500, refundedCents: 600 }, 9_900)).toEqual({ fromCreditCents: 0, fromInvoiceCents: 9_900 });
    expect(refundSplit({ appliedCents: 10_000, creditCents: 0, refundedCents: 600 }, 9_401)).toBeNull();
  });
});

describe('amounts sent to Stripe', () => {
  it('uses the ISO 4217 minor units that the currency-codes package lists [pub: ISO 4217]', () => {
    for (const code of Object.keys(MINOR_UNITS) as (keyof typeof MINOR_UNITS)[]) {
      expect(MINOR_UNITS[code], code).toBe(currencyCodes.code(code)!.digits);
    }
    // The table's other anchors (ISO 4217): JPY has no minor unit, EUR two.
    expect(currencyCodes.code('JPY')!.digits).toBe(0);
    expect(currencyCodes.code('EUR')!.digits).toBe(2);
  });
  it('sends $1.00 as 100 and $4,321.00 as 432100 (Stripe API reference: smallest currency unit)', () => {
    expect(toStripeAmount(100, 'USD')).toBe(100);
    expect(toStripeAmount(432_100, 'CAD')).toBe(432_100);
    fc.assert(fc.property(fc.integer({ min: 1, max: 99_999_999 }), (c) => {
      const digits = currencyCodes.code('USD')!.digits;
      expect(toStripeAmount(c, 'USD')).toBe(c * 10 ** (digits - 2));
      expect(fromStripeAmount(toStripeAmount(c, 'USD'), 'USD')).toBe(c);
    }));
  });
});

describe('numbers and money input', () => {
  it('formats invoice numbers', () => {
    expect(formatInvoiceNumber('INV', 7)).toBe('INV-0007');
    expect(formatInvoiceNumber('TF', 12_345)).toBe('TF-12345');
  });
  it('reads typed amounts without floating point', () => {
    expect(parseMoney('1,234.56')).toBe(123_456);
    expect(parseMoney('$80')).toBe(8_000);
    expect(parseMoney('12.5')).toBe(1_250);
    expect(parseMoney('0.29')).toBe(29);
    expect(parseMoney('-3.10')).toBe(-310);
    for (const bad of ['', 'abc', '1.234', '1e5', '12.3.4']) expect(parseMoney(bad), bad).toBeNull();
  });
});
