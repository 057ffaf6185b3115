import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { refundSplit } from '../../../src/lib/billing/payments';
import { countsAsRefunded, laterRefundState, processorState, refundReversal, type ProcessorRefundState } from '../../../src/lib/billing/refunds';

// Stripe's refund states and moves (stripe-node types, Refund.status; Stripe's refund docs:
// pending or requires_action → succeeded, failed or canceled; a card refund can fail after it
// first showed as succeeded, as Stripe's test card 4000 0000 0000 5126 does).
const STRIPE_STATES = ['requires_action', 'pending', 'succeeded', 'failed', 'canceled'] as const;

describe('a refund\'s state at the card processor', () => {
  it('ends the same whatever order its events arrive in, and however often', () => {
    const lives: ProcessorRefundState[][] = [
      ['pending', 'succeeded'],
      ['succeeded', 'failed'],
      ['pending', 'succeeded', 'failed'],
      ['requires_action', 'canceled'],
      ['requires_action', 'pending', 'succeeded'],
    ];
    for (const life of lives) {
      const last = life[life.length - 1];
      fc.assert(fc.property(fc.shuffledSubarray(life, { minLength: life.length, maxLength: life.length }), fc.array(fc.nat(life.length - 1), { maxLength: 4 }), (order, repeats) => {
        const seen = [...order, ...repeats.map((i) => life[i])];
        expect(seen.reduce(laterRefundState, 'requested' as ProcessorRefundState)).toBe(last);
      }));
    }
  });

  it('is a join: order and grouping do not matter', () => {
    const s = fc.constantFrom<ProcessorRefundState>('requested', ...STRIPE_STATES);
    fc.assert(fc.property(s, s, s, (a, b, c) => {
      expect(laterRefundState(a, b)).toBe(laterRefundState(b, a));
      expect(laterRefundState(laterRefundState(a, b), c)).toBe(laterRefundState(a, laterRefundState(b, c)));
      expect(laterRefundState(a, a)).toBe(a);
    }));
  });

  it('counts while money is on its way back, not once it failed or was canceled', () => {
    expect(STRIPE_STATES.filter(countsAsRefunded)).toEqual(['requires_action', 'pending', 'succeeded']);
    expect(countsAsRefunded('requested')).toBe(false);
    expect(countsAsRefunded('refused')).toBe(false);
    expect(processorState(null)).toBe('pending');
    expect(processorState('something_new')).toBe('pending');
  });
});

describe('putting back a refund that failed', () => {
  it('gives the invoice back what came off it, credit first (a worked case)', () => {
    // $100 paid: $95 on the invoice, $5 credit. Refunded $8 ($5 off credit, $3 off the invoice), then $10 more.
    const pay = { appliedCents: 9_500, creditCents: 500, refundedCents: 0 };
    const first = refundSplit(pay, 800)!;
    expect(first).toEqual({ fromCreditCents: 500, fromInvoiceCents: 300 });
    const second = refundSplit({ ...pay, refundedCents: 800 }, 1_000)!;
    expect(second).toEqual({ fromCreditCents: 0, fromInvoiceCents: 1_000 });
    // The $10 refund fails: all of it goes back on the invoice, $8 stays refunded.
    expect(refundReversal({ creditCents: 500, refundedCents: 1_800 }, 1_000)).toEqual({ toInvoiceCents: 1_000, refundedCents: 800 });
    // Had the $8 one failed instead: refunds are taken off credit first, so of the $10 left, $5 is credit and $5 the invoice's.
    expect(refundReversal({ creditCents: 500, refundedCents: 1_800 }, 800)).toEqual({ toInvoiceCents: 800, refundedCents: 1_000 });
    expect(refundReversal({ creditCents: 500, refundedCents: 1_800 }, 1_801)).toBeNull();
  });

  it('leaves the invoice as if the failed refund never happened', () => {
    fc.assert(fc.property(
      fc.integer({ min: 1, max: 1e9 }), fc.integer({ min: 0, max: 1e8 }), fc.array(fc.integer({ min: 1, max: 1e8 }), { minLength: 1, maxLength: 8 }), fc.nat(),
      (applied, credit, asks, pick) => {
        const pay = { appliedCents: applied, creditCents: credit, refundedCents: 0 };
        const made: number[] = [];
        let offInvoice = 0;
        for (const a of asks) {
          const part = refundSplit(pay, a);
          if (!part) continue;
          made.push(a);
          pay.refundedCents += a;
          offInvoice += part.fromInvoiceCents;
        }
        if (!made.length) return;
        const failed = made[pick % made.length];
        const back = refundReversal(pay, failed)!;
        // The same refunds without the failed one, split afresh.
        const again = { appliedCents: applied, creditCents: credit, refundedCents: 0 };
        let offWithout = 0;
        made.filter((_, i) => i !== made.indexOf(failed)).forEach((a) => { offWithout += refundSplit(again, a)!.fromInvoiceCents; again.refundedCents += a; });
        expect(back.refundedCents).toBe(again.refundedCents);
        expect(offInvoice - back.toInvoiceCents).toBe(offWithout);
      },
    ));
  });
});
