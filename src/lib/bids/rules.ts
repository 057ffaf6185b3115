import type { CompanySettings } from '../settings/schema.ts';
import type { SiteRules } from '../takeoff/input.ts';
import type { PricingSettings } from '../pricing/price.ts';
import type { LocateRules } from '../checklist/checklist.ts';
import { isTimeZone } from '../format.ts';

/** What a takeoff, a price and a locate ticket take from the company's settings. */
export function rulesFrom(s: CompanySettings): { site: SiteRules; pricing: PricingSettings; locate: LocateRules; targetMarginPct: number } {
  return {
    site: { frostDepthIn: s.frostDepthIn ?? null, permitMaxHeightIn: { front: s.permitMaxFrontIn ?? null, side: s.permitMaxSideIn ?? null, back: s.permitMaxBackIn ?? null } },
    pricing: { labourBurdenPct: s.labourBurdenPct, taxMode: s.taxMode, taxRatePct: s.taxRatePct, bidRoundingCents: s.bidRoundingCents },
    locate: {
      waitBusinessDays: s.locateWaitBusinessDays, validDays: s.locateValidDays, validBasis: s.locateValidBasis,
      calendar: { workdays: s.businessDays, holidays: s.holidays },
    },
    targetMarginPct: s.targetMarginPct,
  };
}

const dayFormats = new Map<string, Intl.DateTimeFormat | null>();

/** Today's date where the company is (the clock is read by the caller); UTC for a zone Intl does not know. */
export function todayIn(timeZone: string, now: Date): string {
  let f = dayFormats.get(timeZone);
  if (f === undefined) {
    f = isTimeZone(timeZone) ? new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }) : null;
    dayFormats.set(timeZone, f);
  }
  return f ? f.format(now) : now.toISOString().slice(0, 10);
}
