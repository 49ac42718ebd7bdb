// Playwright runs on Debian's Chromium (never a downloaded browser). Install it when missing and
// we are root; otherwise stop with a message naming what to install.
import { existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';

export function ensureChromium() {
  const exe = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
  if (existsSync(exe)) return exe;
  if (process.getuid && process.getuid() === 0) {
    console.log('Chromium is missing: installing Debian\'s chromium package…');
    const r = spawnSync('sh', ['-c', 'apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium'], { stdio: 'inherit' });
    if (r.status === 0 && existsSync(exe)) return exe;
  }
  console.error(`Chromium not found at ${exe}. Install it (Debian: sudo apt-get install -y chromium) or set CHROMIUM_PATH.`);
  process.exit(1);
}

if (import.meta.url === `file://${process.argv[1]}`) ensureChromium();
