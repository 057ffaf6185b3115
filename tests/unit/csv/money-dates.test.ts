import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { format, isValid, parse } from 'date-fns';
import { extendCents, parseMoney, parseQuantity, toCents, normaliseUnit } from '../../../src/lib/csv/numbers';
import { expandYear, guessDateFormat, parseDate } from '../../../src/lib/csv/dates';

const cents = (raw: string, mark: '.' | ',' = '.') => {
  const p = parseMoney(raw, mark);
  if (!p.ok) return p.reason;
  return p.value === null ? null : toCents(p.value);
};

describe('money', () => {
  it.each([
    ['1,234.56', 123456],
    ['$1,234.56', 123456],
    ['(12.50)', -1250],
    ['-12.50', -1250],
    ['$-12.50', -1250],
    ['-$12.50', -1250],
    ['12.50-', -1250],
    ['12.50 CR', -1250],
    ['($1,000)', -100000],
    ['  7 ', 700],
    ['.5', 50],
    ['USD 19.99', 1999],
    ['0.125', 13],
    ['-0.125', -13],
    ['', null],
  ])('%s → %s cents', (raw, want) => {
    expect(cents(raw)).toBe(want);
  });

  it.each([
    ['1.234,56', 123456],
    ['1 234,56', 123456],
    ['(12,50)', -1250],
    ['€ 9,99', 999],
    ['1234', 123400],
  ])('%s with a decimal comma → %s cents', (raw, want) => {
    expect(cents(raw, ',')).toBe(want);
  });

  it.each([
    ['abc', '"abc" is not an amount'],
    ['12.3.4', '"12.3.4" is not an amount'],
    ['1,23.45', '"1,23.45" is not an amount'],
    ['-(5.00)', 'more than one minus sign'],
    ['$', 'is not an amount'],
  ])('refuses %s', (raw, reason) => {
    expect(cents(raw)).toContain(reason);
  });

  it('tells a comma-decimal amount from a point-decimal one, and says which mark to set', () => {
    expect(cents('1.234,56')).toContain('decimal comma');
    expect(cents('12,50')).toContain('decimal comma');
    expect(cents('1,234.56', ',')).toContain('decimal point');
  });

  it('reads back any cents amount however it is written (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: -99_999_999_999, max: 99_999_999_999 }), fc.constantFrom('plain', 'grouped', 'dollar', 'paren'), (c, style) => {
        const a = Math.abs(c);
        const whole = String(Math.floor(a / 100));
        const frac = String(a % 100).padStart(2, '0');
        const grouped = whole.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
        const body = style === 'plain' ? `${whole}.${frac}` : `${style === 'dollar' ? '$' : ''}${grouped}.${frac}`;
        const text = c < 0 ? (style === 'paren' ? `(${body})` : `-${body}`) : body;
        expect(cents(text)).toBe(c);
        const euro = `${whole.replace(/\B(?=(\d{3})+(?!\d))/g, '.')},${frac}`;
        expect(cents(c < 0 ? `-${euro}` : euro, ',')).toBe(c);
      }),
    );
  });

  it('extends quantity × unit price with one rounding (3 × $0.335 = $1.005 → $1.01)', () => {
    const q = parseQuantity('3');
    const p = parseMoney('0.335');
    if (!q.ok || !q.value || !p.ok || !p.value) throw new Error('parse');
    expect(extendCents(q.value.value, p.value)).toBe(101);
  });
});

describe('quantities and units', () => {
  it.each([
    ['12', '12', null],
    ['12 ea', '12', 'each'],
    ['3.5 LF', '3.5', 'ft'],
    ["10'", '10', 'ft'],
    ['(2) EA', '-2', 'each'],
    ['-4 bags', '-4', 'bag'],
    ['1,200 ft', '1200', 'ft'],
    ['0.333333', '0.3333', null],
  ])('%s → %s %s', (raw, value, unit) => {
    const q = parseQuantity(raw);
    expect(q.ok).toBe(true);
    if (!q.ok || !q.value) return;
    expect(String(q.value.value.units / 10 ** q.value.value.scale)).toBe(value);
    expect(q.value.unit).toBe(unit);
  });

  it('normalises the units receipts use', () => {
    expect(['EA', 'pcs', 'Bags', 'BX', 'RL', 'LF', 'lbs'].map(normaliseUnit)).toEqual(['each', 'each', 'bag', 'box', 'roll', 'ft', 'lb']);
    expect(normaliseUnit('Skid')).toBe('skid');
    expect(normaliseUnit('  ')).toBeNull();
  });

  it('refuses a quantity that is not a number', () => {
    const q = parseQuantity('lots');
    expect(q.ok).toBe(false);
  });
});

describe('dates', () => {
  it.each([
    ['2026-03-14', 'iso', '2026-03-14'],
    ['2026-03-14T08:30:00Z', 'iso', '2026-03-14'],
    ['3/14/2026', 'mdy', '2026-03-14'],
    ['03/14/26', 'mdy', '2026-03-14'],
    ['14/03/2026', 'dmy', '2026-03-14'],
    ['14.03.2026', 'dmy', '2026-03-14'],
    ['2026/03/14', 'ymd', '2026-03-14'],
    ['2/29/2028', 'mdy', '2028-02-29'],
  ] as const)('%s (%s) → %s', (raw, f, want) => {
    expect(parseDate(raw, f)).toEqual({ ok: true, value: want });
  });

  it.each([
    ['2/30/2026', 'mdy'],
    ['2/29/2027', 'mdy'],
    ['13/14/2026', 'mdy'],
    ['2026-13-01', 'iso'],
    ['yesterday', 'iso'],
    ['3/14/2026', 'iso'],
  ] as const)('refuses %s as %s with a reason', (raw, f) => {
    const r = parseDate(raw, f);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toContain(raw);
  });

  it('reads two-digit years as POSIX strptime %y does (69–99 → 19xx, 00–68 → 20xx)', () => {
    expect([expandYear('68'), expandYear('69'), expandYear('99'), expandYear('00')]).toEqual([2068, 1969, 1999, 2000]);
  });

  it('agrees with date-fns on every calendar day, in each format (property)', () => {
    // date-fns (npm) parses the same strings with its own format tokens: an independent reader.
    const FNS = { iso: 'yyyy-MM-dd', mdy: 'M/d/yyyy', dmy: 'dd.MM.yyyy', ymd: 'yyyy/MM/dd' } as const;
    fc.assert(
      fc.property(fc.date({ min: new Date('1990-01-01T00:00:00Z'), max: new Date('2099-12-31T00:00:00Z'), noInvalidDate: true }), fc.constantFrom('iso', 'mdy', 'dmy', 'ymd' as const), (d, f) => {
        const local = new Date(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate());
        const text = format(local, FNS[f]);
        const ours = parseDate(text, f);
        const theirs = parse(text, FNS[f], new Date(2000, 0, 1));
        expect(isValid(theirs)).toBe(true);
        expect(ours).toEqual({ ok: true, value: format(theirs, 'yyyy-MM-dd') });
      }),
    );
  });

  it('guesses the format from sample values, US first when both fit', () => {
    expect(guessDateFormat(['03/04/2026', '03/05/2026'])).toBe('mdy');
    expect(guessDateFormat(['03/04/2026', '25/05/2026'])).toBe('dmy');
    expect(guessDateFormat(['2026-03-04'])).toBe('iso');
  });
});
