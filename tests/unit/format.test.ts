import { describe, expect, it } from 'vitest';
import { formatMoney, money } from '../../src/lib/format';
import { escapeHtml, neutraliseCsvCell } from '../../src/lib/text';

describe('display formatting', () => {
  it('formats integer cents as dollars', () => {
    expect(formatMoney(123456)).toBe('$1,234.56');
    expect(formatMoney(-1250)).toBe('-$12.50');
    expect(formatMoney(null)).toBe('—');
  });
  it('refuses fractional cents', () => {
    expect(() => money(10.5)).toThrow();
  });
  it('escapes markup and neutralises spreadsheet formulas (OWASP CSV injection)', () => {
    expect(escapeHtml('<b a="1">&\'')).toBe('&lt;b a=&quot;1&quot;&gt;&amp;&#39;');
    for (const c of ['=SUM(A1)', '+1', '-2', '@cmd', '\tx', '\rx']) expect(neutraliseCsvCell(c).startsWith("'")).toBe(true);
    expect(neutraliseCsvCell('4x4 post')).toBe('4x4 post');
  });
});
