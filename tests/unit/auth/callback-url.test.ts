import { describe, expect, it } from 'vitest';
import { safeCallbackPath, safeRedirectUrl } from '@/lib/auth/callback-url';

// Known open-redirect shapes (from common practice: OWASP "Unvalidated Redirects and Forwards",
// the WHATWG URL standard's treatment of "\" and of tab and newline characters), as they reach the
// page after the query string is decoded once, and as they arrive encoded.
const BYPASSES = [
  '/\\evil.example/phish', // ?callbackUrl=/%5Cevil.example/phish
  '/%5Cevil.example/phish', // double-encoded
  '/%255Cevil.example', // triple
  '/\tevil.example', // ?callbackUrl=/%09/evil.example
  '/\t/evil.example',
  '/%09/evil.example',
  '/\n/evil.example',
  '/\r/evil.example',
  '//evil.example',
  '///evil.example',
  '/%2Fevil.example',
  '/%2F%2Fevil.example',
  '/.//evil.example',
  '/..//evil.example',
  '/a/..//evil.example',
  '/\\\\evil.example',
  '\\\\evil.example',
  '\\/evil.example',
  'https://evil.example',
  'http:evil.example',
  '//evil.example@127.0.0.1',
  'javascript:alert(1)',
  'JaVaScRiPt:alert(1)',
  ' /library',
  'data:text/html,<script>alert(1)</script>',
  '/%E0%A4%A', // undecodable
  '',
  undefined,
  null,
  42,
];

describe('the sign-in callback accepts only paths of this application', () => {
  it.each(BYPASSES.map((b) => [JSON.stringify(b), b]))('refuses %s', (_label, raw) => {
    expect(safeCallbackPath(raw)).toBe('/');
  });

  it('keeps an ordinary path with its query and fragment, normalised', () => {
    expect(safeCallbackPath('/library/versions/12?compare=3#audit')).toBe('/library/versions/12?compare=3#audit');
    expect(safeCallbackPath('/data/../library')).toBe('/library');
    expect(safeCallbackPath('/fits?name=a%20b')).toBe('/fits?name=a%20b');
    expect(safeCallbackPath(['/queue', '//evil.example'])).toBe('/queue');
  });

  it('next-auth redirects: a path or a URL of this origin, else the home page', () => {
    const base = 'http://127.0.0.1:3000';
    expect(safeRedirectUrl('/queue', base)).toBe('http://127.0.0.1:3000/queue');
    expect(safeRedirectUrl('http://127.0.0.1:3000/library?x=1', base)).toBe('http://127.0.0.1:3000/library?x=1');
    expect(safeRedirectUrl('http://127.0.0.1:4000/library', base)).toBe('http://127.0.0.1:3000/');
    expect(safeRedirectUrl('/\\evil.example', base)).toBe('http://127.0.0.1:3000/');
    expect(safeRedirectUrl('https://evil.example/', base)).toBe('http://127.0.0.1:3000/');
  });
});
