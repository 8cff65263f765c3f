import localFont from 'next/font/local';

// Fonts ship with the app (copied from the @fontsource packages; licences beside them):
// the Google-hosted font loader would need the network at build time.
export const plex = localFont({
  src: [
    { path: './fonts/ibm-plex-sans-latin-400-normal.woff2', weight: '400', style: 'normal' },
    { path: './fonts/ibm-plex-sans-latin-400-italic.woff2', weight: '400', style: 'italic' },
    { path: './fonts/ibm-plex-sans-latin-500-normal.woff2', weight: '500', style: 'normal' },
    { path: './fonts/ibm-plex-sans-latin-600-normal.woff2', weight: '600', style: 'normal' },
  ],
  variable: '--font-plex',
  display: 'swap',
});

export const jbmono = localFont({
  src: [{ path: './fonts/jetbrains-mono-latin-400-normal.woff2', weight: '400', style: 'normal' }],
  variable: '--font-jbmono',
  display: 'swap',
});
