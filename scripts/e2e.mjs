// End-to-end tests: a production build in its own folder (.next-test), then Playwright, which
// starts `next start` on a temporary database (playwright.config.ts).
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { root } from './env.mjs';
import { ensureChromium } from './ensure-chromium.mjs';

const exe = ensureChromium();
const env = { ...process.env, NEXT_DIST_DIR: '.next-test', CHROMIUM_PATH: exe, NEXT_TELEMETRY_DISABLED: '1', BUILD_ID: process.env.BUILD_ID || `t${Date.now()}` };
const next = path.join(root, 'node_modules/next/dist/bin/next');
if (!process.env.E2E_SKIP_BUILD) {
  const b = spawnSync(process.execPath, [next, 'build', '--webpack'], { cwd: root, env, stdio: 'inherit' });
  if (b.status !== 0) process.exit(b.status ?? 1);
}
const pw = path.join(root, 'node_modules/@playwright/test/cli.js');
const r = spawnSync(process.execPath, [pw, 'test', ...process.argv.slice(2)], { cwd: root, env, stdio: 'inherit' });
process.exit(r.status ?? 1);
