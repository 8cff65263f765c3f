/** @type {import('next').NextConfig} */
const nextConfig = {
  // A separate output folder per developer server (NEXT_DIST_DIR=.next-me next dev) when several run side by side.
  distDir: process.env.NEXT_DIST_DIR ?? '.next',
  reactStrictMode: true,
  poweredByHeader: false,
  // Packages that load files or native code at run time stay outside the server bundle.
  serverExternalPackages: ['mysql2', 'bcryptjs', 'nodemailer', 'pdfkit'],
  typedRoutes: false,
  turbopack: {
    // stdlib probes for generators with new Function, which the CSP refuses: in the browser the probe answers false.
    resolveAlias: { '@stdlib/assert-has-generator-support': { browser: './lib/browser/no-generator-codegen.cjs' } },
  },
  // `npm test` runs `tsc --noEmit` as its own step; the build does not type-check a second time.
  typescript: { ignoreBuildErrors: true },
  experimental: {
    serverActions: { bodySizeLimit: '2mb' },
    authInterrupts: true,
  },
  async headers() {
    return [
      {
        source: '/:path*',
        headers: [
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'Referrer-Policy', value: 'same-origin' },
          { key: 'X-Frame-Options', value: 'DENY' },
          // Content-Security-Policy and Permissions-Policy come from proxy.ts (a nonce per page).
        ],
      },
      {
        // Answers of the API are about one person's or one token's data: never kept by a browser or a proxy.
        source: '/api/:path*',
        headers: [{ key: 'Cache-Control', value: 'no-store' }],
      },
    ];
  },
};

export default nextConfig;
