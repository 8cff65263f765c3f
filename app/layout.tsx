import type { Metadata } from 'next';
import type { ReactNode } from 'react';
import { mono, sans } from './fonts';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Rhobook', template: '%s · Rhobook' },
  description: 'Estimate, review and publish asset-correlation assumptions for credit portfolios.',
};

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en-GB" className={`${sans.variable} ${mono.variable}`}>
      <body className="min-h-screen antialiased">{children}</body>
    </html>
  );
}
