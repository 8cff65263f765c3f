import type { Metadata } from 'next';
import { headers } from 'next/headers';
import type { ReactNode } from 'react';
import { mono, sans } from './fonts';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Rhobook', template: '%s · Rhobook' },
  description: 'Estimate, review and publish asset-correlation assumptions for credit portfolios.',
};

export default async function RootLayout({ children }: { children: ReactNode }) {
  // Reading the request makes every page render per request, so that each carries the nonce of its
  // own Content-Security-Policy (proxy.ts); a page prerendered at build time would carry none.
  await headers();
  return (
    <html lang="en-GB" className={`${sans.variable} ${mono.variable}`}>
      <body className="min-h-screen antialiased">{children}</body>
    </html>
  );
}
