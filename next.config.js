// @ts-check
const { PHASE_PRODUCTION_BUILD } = require('next/constants');

/**
 * One build id for the pages and the service worker's precache revisions, so that a shell
 * precached at install time is the same one the server would render (SYNC.md, "Offline screens").
 */
const BUILD_ID = process.env.BUILD_ID || `b${Date.now()}`;

/** Static client shells a field officer opens offline; the service worker precaches each one. */
const OFFLINE_SHELLS = ['/', '/field', '/entry', '/tallies', '/scenarios', '/forecast', '/overview', '/sync', '/offline'];

/**
 * Security headers on every page and API response. Next's static pages carry inline bootstrap
 * scripts and cannot take a per-request nonce (they are cached by the service worker), so
 * scripts are limited to this origin plus inline; nothing may be loaded from elsewhere, and no
 * page may be framed. The dev server additionally needs eval for fast refresh.
 */
function securityHeaders(dev) {
  const csp = [
    "default-src 'self'",
    `script-src 'self' 'unsafe-inline'${dev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "worker-src 'self' blob:",
    "manifest-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join('; ');
  return [
    { key: 'Content-Security-Policy', value: csp },
    { key: 'X-Content-Type-Options', value: 'nosniff' },
    { key: 'X-Frame-Options', value: 'DENY' },
    { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
    { key: 'Permissions-Policy', value: 'camera=(self), microphone=(), geolocation=(), payment=(), usb=()' },
    { key: 'Cross-Origin-Opener-Policy', value: 'same-origin' },
  ];
}

/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  distDir: process.env.NEXT_DIST_DIR || '.next',
  generateBuildId: async () => BUILD_ID,
  // sqlite3 is a native addon and Sequelize loads dialects dynamically: keep both out of the bundle.
  serverExternalPackages: ['sqlite3', 'sequelize', 'umzug', 'smtp-server', 'nodemailer'],
  // Types are checked once by `npm run typecheck` (part of `npm test`), not again by every build.
  typescript: { ignoreBuildErrors: true },
  env: { NEXT_PUBLIC_BUILD_ID: BUILD_ID },
  async headers() {
    const dev = process.env.NODE_ENV !== 'production';
    return [
      { source: '/:path*', headers: securityHeaders(dev) },
      // The service worker must be revalidated on every load so that updates are found.
      { source: '/sw.js', headers: [{ key: 'Cache-Control', value: 'no-cache, no-store, must-revalidate' }] },
    ];
  },
};

module.exports = (/** @type {string} */ phase) => {
  // EBBCAST_NO_SW=1: a build without the service worker (the API load benchmark's). Serwist writes
  // public/sw.js, which every build in this folder shares: a second build would replace the service
  // worker of the build that the browser tests and page benchmarks serve.
  if (phase !== PHASE_PRODUCTION_BUILD || process.env.EBBCAST_NO_SW === '1') return nextConfig;
  const withSerwist = require('@serwist/next').default({
    swSrc: 'workers/sw.ts',
    swDest: 'public/sw.js',
    register: false,
    reloadOnOnline: false,
    cacheOnNavigation: false,
    additionalPrecacheEntries: [...OFFLINE_SHELLS, '/manifest.webmanifest'].map((url) => ({ url, revision: BUILD_ID })),
  });
  return withSerwist(nextConfig);
};
