// @ts-check
const { PHASE_PRODUCTION_BUILD } = require('next/constants');

/**
 * One build id for the pages and the service worker's precache revisions, so that a shell
 * precached at install time is the same one the server would render (SYNC.md, "Offline screens").
 */
const BUILD_ID = process.env.BUILD_ID || `b${Date.now()}`;

/** Static client shells a field officer opens offline; the service worker precaches each one. */
const OFFLINE_SHELLS = ['/', '/field', '/entry', '/tallies', '/scenarios', '/forecast', '/overview', '/sync', '/offline'];

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
};

module.exports = (/** @type {string} */ phase) => {
  if (phase !== PHASE_PRODUCTION_BUILD) return nextConfig;
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
