import { describe, expect, it } from 'vitest';
import { clientAddressFrom, normaliseAddress, parseTrustedProxies, requestClientAddress, stampedSocketAddress } from '@/lib/auth/client-address';
import { stampSocket } from '@/lib/ops/socket-stamp.mjs';

// The "rightmost untrusted address" reading of X-Forwarded-For (common practice; MDN,
// "X-Forwarded-For: Selecting an IP address"), worked by hand.
describe('the client address believes X-Forwarded-For only through trusted proxies', () => {
  const none = parseTrustedProxies('');
  const proxies = parseTrustedProxies('10.0.0.0/8, 192.168.1.5, fd00::/8');

  it('without trusted proxies: the socket address, whatever the header says', () => {
    expect(clientAddressFrom('203.0.113.9', '198.51.100.1', none)).toBe('203.0.113.9');
    expect(clientAddressFrom('::ffff:127.0.0.1', '1.2.3.4, 5.6.7.8', none)).toBe('127.0.0.1');
  });

  it('through trusted proxies: the rightmost address that is not one of them', () => {
    expect(clientAddressFrom('10.0.0.2', '198.51.100.7', proxies)).toBe('198.51.100.7');
    // A client that sends its own header cannot choose its address: the proxy appended the real one.
    expect(clientAddressFrom('10.0.0.2', '1.1.1.1, 198.51.100.7', proxies)).toBe('198.51.100.7');
    expect(clientAddressFrom('192.168.1.5', '198.51.100.7, 10.1.2.3', proxies)).toBe('198.51.100.7');
    expect(clientAddressFrom('fd00::1', '2001:db8::7', proxies)).toBe('2001:db8::7');
    // All hops trusted: the leftmost; a garbled entry: the last address vouched for.
    expect(clientAddressFrom('10.0.0.2', '10.9.9.9', proxies)).toBe('10.9.9.9');
    expect(clientAddressFrom('10.0.0.2', 'not-an-address', proxies)).toBe('10.0.0.2');
    // An untrusted socket with a header: the socket.
    expect(clientAddressFrom('198.51.100.200', '10.0.0.1', proxies)).toBe('198.51.100.200');
  });

  it('refuses a bad TRUSTED_PROXIES entry with a sentence naming it', () => {
    expect(() => parseTrustedProxies('10.0.0.0/33')).toThrow(/"10\.0\.0\.0\/33" has a prefix length/);
    expect(() => parseTrustedProxies('proxy.example')).toThrow(/"proxy\.example" is not an IP address/);
  });

  it('normalises IPv4-mapped IPv6 and brackets', () => {
    expect(normaliseAddress('::ffff:192.0.2.1')).toBe('192.0.2.1');
    expect(normaliseAddress('[2001:DB8::1]')).toBe('2001:db8::1');
    expect(normaliseAddress('x')).toBeNull();
  });
});

describe('the socket address stamped by the web process', () => {
  it('is overwritten on every request and believed only with this process’s token', () => {
    const req = { headers: { 'x-rhobook-socket': 'forged 1.2.3.4' } as Record<string, string>, socket: { remoteAddress: '::ffff:203.0.113.5' } };
    stampSocket(req, 'tok123');
    expect(req.headers['x-rhobook-socket']).toBe('tok123 ::ffff:203.0.113.5');
    expect(stampedSocketAddress(req.headers['x-rhobook-socket'], 'tok123')).toBe('203.0.113.5');
    expect(stampedSocketAddress('forged 1.2.3.4', 'tok123')).toBeNull();
    expect(stampedSocketAddress('tok123 1.2.3.4', undefined)).toBeNull();
  });

  it('a spoofed X-Forwarded-For does not move the address of a stamped request', () => {
    const headers: Record<string, string> = { 'x-rhobook-socket': 'tok 203.0.113.5', 'x-forwarded-for': '198.51.100.1' };
    expect(requestClientAddress((n) => headers[n] ?? null, parseTrustedProxies(''), 'tok')).toBe('203.0.113.5');
    // Without a stamp (a development server) the last entry is all there is.
    expect(requestClientAddress((n) => ({ 'x-forwarded-for': '198.51.100.1, 127.0.0.1' })[n] ?? null, parseTrustedProxies(''), 'tok')).toBe('127.0.0.1');
  });
});
