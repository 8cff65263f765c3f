import { describe, expect, it } from 'vitest';
import { contentSecurityPolicy, newNonce, PERMISSIONS_POLICY } from '@/lib/http/security-headers';

describe('Content-Security-Policy', () => {
  it('allows scripts only by this response\'s nonce (and what they load), nothing inline, no framing', () => {
    const nonce = newNonce();
    const csp = contentSecurityPolicy(nonce);
    const d = Object.fromEntries(csp.split('; ').map((x) => [x.split(' ')[0], x.split(' ').slice(1).join(' ')]));
    expect(d['script-src']).toBe(`'self' 'nonce-${nonce}' 'strict-dynamic'`);
    expect(d['script-src']).not.toContain('unsafe');
    expect(d['object-src']).toBe("'none'");
    expect(d['frame-ancestors']).toBe("'none'");
    expect(d['base-uri']).toBe("'self'");
    expect(d['default-src']).toBe("'self'");
    expect(contentSecurityPolicy(nonce, { dev: true })).toContain("'unsafe-eval'");
  });
  it('nonces are fresh 128-bit values, and a malformed one is refused', () => {
    const seen = new Set(Array.from({ length: 1000 }, newNonce));
    expect(seen.size).toBe(1000);
    for (const n of seen) expect(Buffer.from(n, 'base64')).toHaveLength(16);
    expect(() => contentSecurityPolicy("x'; script-src *")).toThrow(RangeError);
  });
  it('Permissions-Policy switches the sensors, camera, microphone and payment off', () => {
    for (const f of ['camera=()', 'microphone=()', 'geolocation=()', 'payment=()', 'usb=()']) expect(PERMISSIONS_POLICY).toContain(f);
  });
});
