import localFont from 'next/font/local';

// Fonts ship with the app (copied from the @fontsource packages; licences beside them): Inter for
// text and Source Code Pro for figures and code, both neutral open typefaces (SIL Open Font
// Licence). The Google-hosted font loader would need the network at build time.
export const sans = localFont({
  src: [
    { path: './fonts/inter-latin-400-normal.woff2', weight: '400', style: 'normal' },
    { path: './fonts/inter-latin-400-italic.woff2', weight: '400', style: 'italic' },
    { path: './fonts/inter-latin-500-normal.woff2', weight: '500', style: 'normal' },
    { path: './fonts/inter-latin-600-normal.woff2', weight: '600', style: 'normal' },
  ],
  variable: '--font-text',
  display: 'swap',
});

export const mono = localFont({
  src: [{ path: './fonts/source-code-pro-latin-400-normal.woff2', weight: '400', style: 'normal' }],
  variable: '--font-figures',
  display: 'swap',
});
