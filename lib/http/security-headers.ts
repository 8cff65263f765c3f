/**
 * The security headers of every page, in one place (proxy.ts sets the per-request ones,
 * next.config.mjs the fixed ones).
 *
 * Content-Security-Policy, nonce-based as the Next.js guide "Content Security Policy" (App Router,
 * Next 16) describes: the proxy makes a fresh nonce per request and passes the policy on the
 * request, Next adds the nonce to its own script tags, and `'strict-dynamic'` lets those scripts
 * load the app's chunks. Styles: the Tailwind sheet is a file of this origin; React and the charts
 * set `style` attributes, which CSP can only allow with 'unsafe-inline' for styles (no script can
 * run from a style). Everything else comes from this origin only; nothing may frame the app.
 */
export function contentSecurityPolicy(nonce: string, { dev = false }: { dev?: boolean } = {}): string {
  if (!/^[A-Za-z0-9+/=_-]{16,}$/.test(nonce)) throw new RangeError('A CSP nonce must be at least 16 base64 characters.');
  const directives = [
    "default-src 'self'",
    // Next's development server evaluates code for fast refresh; the production build does not.
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    `connect-src 'self'${dev ? ' ws: wss:' : ''}`,
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    "manifest-src 'self'",
    "worker-src 'self' blob:",
  ];
  return directives.join('; ');
}

/** A fresh nonce for one response: 16 random bytes, base64. */
export function newNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return btoa(String.fromCharCode(...bytes));
}

/**
 * Browser features the app never uses, switched off for it and for anything it might embed
 * (W3C Permissions Policy; the feature names of the Permissions-Policy registry).
 */
export const PERMISSIONS_POLICY = [
  'accelerometer=()',
  'autoplay=()',
  'camera=()',
  'display-capture=()',
  'encrypted-media=()',
  'fullscreen=(self)',
  'geolocation=()',
  'gyroscope=()',
  'magnetometer=()',
  'microphone=()',
  'midi=()',
  'payment=()',
  'publickey-credentials-get=()',
  'screen-wake-lock=()',
  'usb=()',
  'xr-spatial-tracking=()',
].join(', ');
