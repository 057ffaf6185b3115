import { describe, expect, it } from 'vitest';
import { nextOrHome, safeNextPath } from '../../../src/lib/auth/safe-path';

// Values a browser would take to another site or run as script once assigned to
// location.href (WHATWG URL Standard: backslash is a slash in special URLs, tab and newline
// are removed anywhere, leading C0 controls and spaces are trimmed).
const HOSTILE = [
  '//evil.example',
  '//evil.example/x',
  '/\\evil.example/x',
  '\\/evil.example',
  '\\\\evil.example',
  '/\t/evil.example',
  '/\n/evil.example',
  '/\r/evil.example',
  '/\u0000/evil.example',
  ' /evil',
  '\t//evil.example',
  'javascript:alert(1)',
  'JaVaScRiPt:alert(1)',
  'data:text/html,<script>alert(1)</script>',
  'https://evil.example/',
  'http:evil.example',
  'evil.example/path',
  '/%2F%2Fevil.example',
  '/%2f/evil.example',
  '/%5Cevil.example',
  '/%5cevil.example',
  '/%09/evil.example',
  '/%0A/evil.example',
  '/jobs/%5C%5Cevil.example',
  '/\u2028/evil.example',
  '/\u00a0/evil',
  '',
  '/'.padEnd(3000, 'a'),
];

describe('safeNextPath', () => {
  it.each(HOSTILE)('refuses %j', (value) => {
    expect(safeNextPath(value)).toBeNull();
    expect(nextOrHome(value)).toBe('/');
  });

  it('refuses what URLSearchParams gives for an address-bar ?next=/%5Cevil.example/x', () => {
    const next = new URLSearchParams('next=/%5Cevil.example/x').get('next');
    expect(next).toBe('/\\evil.example/x');
    expect(safeNextPath(next)).toBeNull();
    for (const raw of ['next=%2F%09%2Fevil.example', 'next=%2F%0A%2Fevil.example', 'next=%2F%2Fevil.example', 'next=javascript%3Aalert(1)']) {
      expect(safeNextPath(new URLSearchParams(raw).get('next')), raw).toBeNull();
    }
  });

  it('keeps a plain path on this site, with its query and fragment', () => {
    for (const ok of ['/', '/jobs', '/jobs?status=won&sort=customer', '/jobs/12#costs', '/accept-invite/abc123', '/reset-password', '/customers/7/edit']) {
      expect(safeNextPath(ok)).toBe(ok);
    }
    expect(safeNextPath(null)).toBeNull();
    expect(safeNextPath(undefined)).toBeNull();
  });

  it('whatever it returns resolves to this origin when a browser follows it', () => {
    const base = 'https://app.tallypost.example';
    for (const v of [...HOSTILE, '/jobs', '/a/../b', '/./x']) {
      const out = nextOrHome(v);
      expect(new URL(out, base).origin, v).toBe(base);
    }
  });
});
