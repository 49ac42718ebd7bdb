// `npm start`: build if there is no current build, then serve. The server migrates the database
// and seeds the demo on its first start (instrumentation.ts), and prints the demo sign-ins.
import { spawnSync, spawn } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { root, dataDir, ensureSecret } from './env.mjs';
import { startCatcher } from './mail-catcher.mjs';

const port = process.env.PORT || '3000';
const host = process.env.HOST || '0.0.0.0';
const distDir = process.env.NEXT_DIST_DIR || '.next';
const buildIdFile = path.join(root, distDir, 'BUILD_ID');

/** Newest modification time under the source folders, to tell a stale build. */
function newestSource() {
  let newest = 0;
  const walk = (dir) => {
    if (!existsSync(dir)) return;
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(p);
      else newest = Math.max(newest, statSync(p).mtimeMs);
    }
  };
  for (const d of ['app', 'components', 'lib', 'workers', 'models']) walk(path.join(root, d));
  for (const f of ['next.config.js', 'tailwind.config.ts', 'package-lock.json']) {
    if (existsSync(path.join(root, f))) newest = Math.max(newest, statSync(path.join(root, f)).mtimeMs);
  }
  return newest;
}

const env = {
  ...process.env,
  NEXTAUTH_SECRET: ensureSecret(),
  NEXTAUTH_URL: process.env.NEXTAUTH_URL || `http://localhost:${port}`,
  DATABASE_URL: process.env.DATABASE_URL || `file:${path.join(dataDir, 'ebbcast.sqlite')}`,
  EBBCAST_DATA_DIR: dataDir,
  NEXT_TELEMETRY_DISABLED: '1',
};

if (!existsSync(buildIdFile) || statSync(buildIdFile).mtimeMs < newestSource()) {
  console.log(existsSync(buildIdFile) ? 'Sources changed since the last build: building…' : 'No build yet: building…');
  const r = spawnSync(process.execPath, [path.join(root, 'node_modules/next/dist/bin/next'), 'build', '--webpack'], { cwd: root, env, stdio: 'inherit' });
  if (r.status !== 0) process.exit(r.status ?? 1);
}

// No SMTP relay configured: catch mail locally (loopback only); admins read it on /mail.
if (!env.SMTP_URL) {
  const catcher = await startCatcher({ dir: path.join(dataDir, 'mail'), port: Number(process.env.MAIL_CATCHER_PORT || 0) });
  env.SMTP_URL = catcher.url;
  env.MAIL_CATCHER_DIR = catcher.dir;
  console.log(`No SMTP_URL: mail goes to the local catcher on ${catcher.url} (sent mail: /mail, files: ${path.relative(root, catcher.dir)})`);
}
console.log(`Ebbcast on http://localhost:${port}  (data: ${path.relative(root, dataDir) || '.'})`);
const child = spawn(process.execPath, [path.join(root, 'node_modules/next/dist/bin/next'), 'start', '-p', port, '-H', host], { cwd: root, env, stdio: 'inherit' });
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig));
child.on('exit', (code) => process.exit(code ?? 0));
