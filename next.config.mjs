/** @type {import('next').NextConfig} */
const securityHeaders = [
  { key: 'X-Frame-Options', value: 'DENY' },
  { key: 'X-Content-Type-Options', value: 'nosniff' },
  { key: 'Referrer-Policy', value: 'same-origin' },
  { key: 'Permissions-Policy', value: 'camera=(), microphone=(), geolocation=()' },
  {
    key: 'Content-Security-Policy',
    // Next's App Router streams inline bootstrap scripts, so 'unsafe-inline' for scripts is the
    // one exception the framework needs; nothing else is loaded from outside this origin.
    value: [
      "default-src 'self'",
      "script-src 'self' 'unsafe-inline'" + (process.env.NODE_ENV === 'development' ? " 'unsafe-eval'" : ''),
      "style-src 'self' 'unsafe-inline'",
      "img-src 'self' data: blob:",
      "font-src 'self' data:",
      "connect-src 'self'",
      "frame-src 'self'",
      "object-src 'self'",
      "frame-ancestors 'none'",
      "base-uri 'self'",
      "form-action 'self'",
    ].join('; '),
  },
];

const nextConfig = {
  serverExternalPackages: ['sequelize', 'sqlite3', 'pg', 'pg-hstore', 'jcampconverter', 'nodemailer', 'formidable'],
  poweredByHeader: false,
  // Separate build folders let several checkouts' builds (or helpers) run side by side.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  async headers() {
    return [
      { source: '/:path*', headers: securityHeaders },
      // A student's report PDF is shown in a frame on the marking page, so this one response may be
      // framed by this site (not by others), and stays sandboxed with nothing else loaded. Headers set
      // here replace those a route handler sets, so the route's own policy is repeated in full.
      {
        source: '/api/marking/:submissionId/report',
        headers: [
          { key: 'X-Frame-Options', value: 'SAMEORIGIN' },
          { key: 'Content-Security-Policy', value: "sandbox; default-src 'none'; frame-ancestors 'self'" },
        ],
      },
    ];
  },
};

export default nextConfig;
