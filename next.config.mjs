/**
 * The app's own Content-Security-Policy (every page but the calculator).
 * - script-src 'unsafe-inline': Next's App Router streams its bootstrap and flight data
 *   as inline <script> tags; without a per-request nonce (which would make every page
 *   dynamic) they need it. No host but our own may serve scripts.
 * - 'unsafe-eval' only where vega charts run (studio, support): vega compiles chart
 *   expressions with the Function constructor. The dev server needs it everywhere.
 * - style-src 'unsafe-inline': React and vega write style attributes.
 */
function appPolicy({ charts }) {
  const evalAllowed = charts || process.env.NODE_ENV !== 'production';
  return [
    "default-src 'self'",
    `script-src 'self' 'unsafe-inline'${evalAllowed ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    // the studio previews its calculators in an iframe of our own origin
    "frame-src 'self'",
    "frame-ancestors 'none'",
    // forms post only to us; checkout leaves by navigation (location.assign), not a form
    "form-action 'self'",
    "base-uri 'self'",
    "object-src 'none'",
    "worker-src 'self' blob:",
    "manifest-src 'self'",
  ].join('; ');
}

/** @type {import('next').NextConfig} */
const nextConfig = {
  // Parallel work trees / test stacks may build side by side into their own folders.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // Native/ORM packages must stay as runtime requires, not bundled.
  serverExternalPackages: ['sequelize', 'sqlite3', 'umzug', 'smtp-server', 'mailparser', 'nodemailer'],
  poweredByHeader: false,
  reactStrictMode: true,
  async headers() {
    // Pages are never framed except the calculator, which sets its own CSP per embed
    // (frame-ancestors from the embed's allowed hosts), so /embed/ is left out here.
    return [
      {
        source: '/((?!embed/).*)',
        headers: [
          { key: 'X-Frame-Options', value: 'DENY' },
          { key: 'Content-Security-Policy', value: appPolicy({ charts: false }) },
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
        ],
      },
      // Studio and support pages draw vega charts; a later match overrides the key above.
      ...['/studio', '/studio/:path*', '/support', '/support/:path*'].map((source) => ({
        source,
        headers: [{ key: 'Content-Security-Policy', value: appPolicy({ charts: true }) }],
      })),
      {
        source: '/embed/:path*',
        headers: [
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
        ],
      },
    ];
  },
};

export default nextConfig;
