import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import Papa from 'papaparse';
import { centsToDollars, parseDollars, parsePriceBookRows, priceBookCsvRows, type PriceBookItem } from '../../../src/lib/pricing/pricebook';
import { COST_CATEGORIES } from '../../../src/lib/costs/categories';

describe('dollars to cents', () => {
  it('parses amounts exactly, without floating point', () => {
    expect(parseDollars('12.34')).toBe(1234);
    expect(parseDollars('$1,234.5')).toBe(123450);
    expect(parseDollars('0.07')).toBe(7);
    expect(parseDollars('19')).toBe(1900);
    for (const bad of ['', 'twelve', '1.005', '-3', '1e3', '12.3.4']) expect(parseDollars(bad), bad).toBeNull();
  });

  it('round-trips every amount', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: 99_999_999_99 }), (c) => { expect(parseDollars(centsToDollars(c))).toBe(c); }));
  });
});

describe('price-book CSV', () => {
  const text = fc.string({ minLength: 1, maxLength: 30 }).map((s) => s.replace(/[\u0000-\u001f]/g, ' ').trim()).filter((s) => s.length > 0 && !/^[=+\-@']/.test(s));
  const item = fc.record({
    sku: fc.stringMatching(/^[A-Z0-9][A-Z0-9\-]{0,11}$/),
    name: text,
    category: fc.constantFrom(...COST_CATEGORIES),
    unit: fc.constantFrom('each', 'bag', 'roll', 'day', 'half day'),
    unitCostCents: fc.integer({ min: 0, max: 10_000_000 }),
    supplierName: fc.option(fc.constantFrom('Yard, "North"', 'Kestrel\nSupply', 'Plain'), { nil: null }),
    lastSeenOn: fc.option(fc.constantFrom('2026-01-31', '2025-12-01'), { nil: null }),
    active: fc.boolean(),
    notes: fc.option(fc.constantFrom('has, a comma', 'two\nlines', '"quoted"'), { nil: null }),
  });

  it('reads back what it exports: commas, quotes and line breaks survive (RFC 4180 quoting by papaparse)', () => {
    fc.assert(fc.property(fc.uniqueArray(item, { selector: (i) => i.sku, maxLength: 12 }), (items) => {
      const full: PriceBookItem[] = items.map((it, i) => ({ ...it, id: i + 1, supplierId: null, updatedAt: '' }));
      const csv = Papa.unparse(priceBookCsvRows(full));
      const rows = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: 'greedy' }).data;
      const back = parsePriceBookRows(rows);
      expect(back.fields).toEqual({});
      expect(back.items).toEqual(items.map(({ sku, name, category, unit, unitCostCents, supplierName, lastSeenOn, active, notes }) => ({ sku, name, category, unit, unitCostCents, supplierName, lastSeenOn, active, notes })));
    }), { numRuns: 100 });
  });

  it('neutralises cells a spreadsheet would run as formulas (OWASP, "CSV Injection")', () => {
    const rows = priceBookCsvRows([{ id: 1, sku: 'X-1', name: '=1+2', category: 'material', unit: 'each', unitCostCents: 100, supplierId: null, supplierName: '@SUM(A1)', lastSeenOn: null, active: true, notes: '+cmd', updatedAt: '' }]);
    expect(rows[1]).toEqual(['X-1', "'=1+2", 'material', 'each', '1.00', "'@SUM(A1)", '', 'yes', "'+cmd"]);
  });

  it('names the line and the column of each bad row, and catches a code used twice', () => {
    const { fields, items } = parsePriceBookRows([
      { sku: 'A-1', name: 'Ok', category: 'material', unit: 'each', unit_cost: '1.00' },
      { sku: 'A-2', name: 'Bad', category: 'lumber', unit: 'each', unit_cost: '1.00' },
      { sku: 'a-1', name: 'Again', category: 'material', unit: 'each', unit_cost: '2.00' },
      { sku: 'A-3', name: '', category: 'material', unit: 'each', unit_cost: '2.00' },
    ]);
    expect(items.map((i) => i.sku)).toEqual(['A-1']);
    expect(Object.keys(fields).sort()).toEqual(['rows.3.category', 'rows.4.sku', 'rows.5.name']);
    expect(fields['rows.4.sku']).toMatch(/also on line 2/);
  });
});
