import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';

/**
 * The signature of a webhook: HMAC-SHA256 over the exact bytes of the JSON body with the model's
 * secret, sent as `X-Rhobook-Signature: sha256=<lower-case hex>`. A receiver recomputes it over the
 * body it received (before parsing) and compares in constant time. The body carries the event's
 * time and the delivery id, so a signed body cannot be replayed as another event.
 *
 * Reference: RFC 2104 (HMAC); FIPS 180-4 (SHA-256).
 */
export const SIGNATURE_HEADER = 'x-rhobook-signature';
export const DELIVERY_HEADER = 'x-rhobook-delivery';
export const EVENT_HEADER = 'x-rhobook-event';

export function signBody(secret: string, body: string): string {
  return `sha256=${createHmac('sha256', secret).update(body, 'utf8').digest('hex')}`;
}

/** True when `header` is the signature of `body` under `secret` (constant-time comparison). */
export function verifySignature(secret: string, body: string, header: string | null | undefined): boolean {
  if (!header) return false;
  const expected = Buffer.from(signBody(secret, body), 'utf8');
  const given = Buffer.from(header.trim(), 'utf8');
  return expected.length === given.length && timingSafeEqual(expected, given);
}

/** A new webhook secret: 32 random bytes, base64url, with a prefix that says what it is. */
export function newWebhookSecret(): string {
  return `whsec_${randomBytes(32).toString('base64url')}`;
}
