import { apiHeaders, unframedHeaders } from './lib/http/security-headers.mjs';

/** @type {import('next').NextConfig} */
const nextConfig = {
  // Parallel work trees / test stacks may build side by side into their own folders.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // Native/ORM packages must stay as runtime requires, not bundled.
  serverExternalPackages: ['sequelize', 'pg-boss', 'sqlite3', 'umzug', 'smtp-server', 'mailparser', 'nodemailer'],
  poweredByHeader: false,
  reactStrictMode: true,
  async headers() {
    // Pages are never framed except the calculator, which sets its own CSP per embed
    // (frame-ancestors from the embed's allowed hosts), so /embed/ is left out here.
    return [
      {
        source: '/((?!embed/).*)',
        headers: unframedHeaders(),
      },
      // JSON routes: a policy that lets nothing load (their answers are data, never pages).
      { source: '/api/:path*', headers: apiHeaders() },
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
