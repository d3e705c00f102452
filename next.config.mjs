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
      "object-src 'none'",
      "frame-ancestors 'none'",
      "base-uri 'self'",
      "form-action 'self'",
    ].join('; '),
  },
];

/**
 * Files people uploaded (and PDFs built from their text) get a policy of their own: sandboxed (no
 * script, no plugins, an opaque origin), nothing loaded, never sniffed as another type. Headers set
 * here replace those a route handler sets, so these rules, listed after the site-wide one, are what
 * the browser gets. The student's report PDF is shown in a frame on the marking page, so those
 * responses may be framed by this site (not by others); generated feedback PDFs open in a tab.
 */
const userFileHeaders = (framedByThisSite) => [
  { key: 'X-Frame-Options', value: framedByThisSite ? 'SAMEORIGIN' : 'DENY' },
  {
    key: 'Content-Security-Policy',
    value: `sandbox; default-src 'none'; object-src 'none'; frame-ancestors ${framedByThisSite ? "'self'" : "'none'"}`,
  },
  { key: 'X-Content-Type-Options', value: 'nosniff' },
  { key: 'Cross-Origin-Resource-Policy', value: 'same-origin' },
];
export const USER_FILE_ROUTES = [
  { source: '/api/marking/:submissionId/report', framed: true },
  { source: '/api/uploads/:id', framed: true },
  { source: '/api/marking/:submissionId/preview', framed: false },
  { source: '/api/submissions/:id/feedback', framed: false },
];

/**
 * The learning platform's endpoints answer with small pages of their own (lib/lti/page.ts). Login
 * and launch pages may appear inside the platform's frame (they only offer to open Oscillab in a
 * window of its own, or say why a launch was refused); the deep-linking answer is a form that posts
 * itself back to the platform, so its form-action must reach the platform (https, or loopback for
 * the local fake platform). CSP frame-ancestors takes precedence over X-Frame-Options.
 */
const ltiPolicy = (frameAncestors, formAction) =>
  [
    "default-src 'none'",
    "script-src 'unsafe-inline'",
    "style-src 'unsafe-inline'",
    `form-action ${formAction}`,
    `frame-ancestors ${frameAncestors}`,
    "base-uri 'none'",
  ].join('; ');

const nextConfig = {
  serverExternalPackages: ['sequelize', 'sqlite3', 'pg', 'pg-hstore', 'jcampconverter', 'nodemailer', 'formidable'],
  poweredByHeader: false,
  // Types are checked by `npm run typecheck` (tsc over the whole project, tests included; the first
  // step of `npm test`), not again by `next build`: a production install (`npm ci --omit=dev`) has
  // no test tools or @types packages to check against, and builds faster without the second pass.
  typescript: { ignoreBuildErrors: true },
  // Separate build folders let several checkouts' builds (or helpers) run side by side.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  async headers() {
    return [
      { source: '/:path*', headers: securityHeaders },
      ...USER_FILE_ROUTES.map(({ source, framed }) => ({ source, headers: userFileHeaders(framed) })),
      { source: '/api/lti/login', headers: [{ key: 'Content-Security-Policy', value: ltiPolicy('*', "'self'") }] },
      { source: '/api/lti/launch', headers: [{ key: 'Content-Security-Policy', value: ltiPolicy('*', "'self'") }] },
      {
        source: '/api/lti/deep-link',
        headers: [{ key: 'Content-Security-Policy', value: ltiPolicy("'none'", "'self' https: http://localhost:* http://127.0.0.1:*") }],
      },
    ];
  },
};

export default nextConfig;
