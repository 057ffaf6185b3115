import { describe, expect, it } from 'vitest';
import { formatDateTime, formatMoney, money } from '../../src/lib/format';
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

describe('moments in the office time zone', () => {
  // US Central time is UTC−6 in winter (CST) and UTC−5 from the second Sunday of March to the
  // first Sunday of November (CDT): the Energy Policy Act of 2005, 15 U.S.C. § 260a.
  it('reads a UTC moment in the company zone, named, across daylight saving', () => {
    expect(formatDateTime('2026-12-02T08:05:00Z', 'America/Chicago')).toBe('Dec 2, 2026, 2:05 AM CST');
    expect(formatDateTime('2026-07-02T17:30:00Z', 'America/Chicago')).toBe('Jul 2, 2026, 12:30 PM CDT');
    expect(formatDateTime('2026-03-08T08:30:00Z', 'America/Chicago')).toBe('Mar 8, 2026, 3:30 AM CDT');
  });
  it('falls back to UTC for a zone it does not know', () => {
    expect(formatDateTime('2026-12-02T08:05:00Z', 'Not/AZone')).toBe('Dec 2, 2026, 8:05 AM UTC');
  });
});
