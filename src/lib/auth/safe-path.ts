/**
 * Where to send someone after sign-in (a `next` or `callbackURL` value): a path on this site,
 * or null. Browsers read `/\host`, `/<tab>/host` and `//host` as another site, drop tabs and
 * newlines anywhere in a URL, and run `javascript:` URLs, so only a plain absolute path with
 * no backslash and no control or space characters passes, and it must still resolve to this
 * origin. The value is taken as already decoded once (URLSearchParams does that).
 */
export function safeNextPath(value: string | null | undefined): string | null {
  if (typeof value !== 'string' || value.length === 0 || value.length > 2048) return null;
  if (value[0] !== '/' || value[1] === '/' || value[1] === '\\') return null;
  // Control characters, spaces of every kind and the backslash.
  if (/[\u0000-\u0020\u007f-\u00a0\u1680\u2000-\u200f\u2028-\u202f\u205f\u3000\ufeff\\]/.test(value)) return null;
  const base = 'http://tallypost.invalid';
  let url: URL;
  try {
    url = new URL(value, base);
  } catch {
    return null;
  }
  if (url.origin !== base) return null;
  // Encoded control characters and backslashes, and an encoded slash right after the first,
  // are refused too: a second decoding anywhere on the way would make them `//host` again.
  if (/%(0[0-9a-f]|1[0-9a-f]|7f|5c)/i.test(value) || /^\/(%2f|%5c)/i.test(url.pathname)) return null;
  return url.pathname + url.search + url.hash;
}

/** The same check with the home page as the fallback. */
export function nextOrHome(value: string | null | undefined): string {
  return safeNextPath(value) ?? '/';
}
