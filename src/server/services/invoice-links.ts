import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import { env } from '../env.ts';

/** A fresh random half of a customer link: 32 bytes, base64url. */
export function newNonce(): string {
  return randomBytes(32).toString('base64url');
}

function sign(id: number, nonce: string): string {
  return createHmac('sha256', env().LINK_SIGNING_SECRET).update(`invoice-link:${id}:${nonce}`).digest('base64url');
}

/** The customer's token: id, nonce and an HMAC of both, so a link is unguessable and cannot be forged. */
export function invoiceToken(id: number, nonce: string): string {
  return `${id}.${nonce}.${sign(id, nonce)}`;
}

export function invoiceUrl(id: number, nonce: string): string {
  return `${env().APP_URL}/pay/${invoiceToken(id, nonce)}`;
}

/** The id and nonce of a token whose signature holds, or null. */
export function readToken(token: string | undefined): { id: number; nonce: string } | null {
  if (!token || token.length > 200) return null;
  const m = /^(\d{1,15})\.([A-Za-z0-9_-]{43})\.([A-Za-z0-9_-]{43})$/.exec(token);
  if (!m) return null;
  const id = Number(m[1]);
  const expected = Buffer.from(sign(id, m[2]));
  const given = Buffer.from(m[3]);
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return null;
  return { id, nonce: m[2] };
}
