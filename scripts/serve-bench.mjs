// A production server for the load benchmarks (bench/load.ts): builds into .next-bench when that
// build is missing or older than the sources, starts `next start` on loopback with a temporary
// data folder (fresh SQLite file, demo seed), and stops it by its process id.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { root } from './env.mjs';

export const DIST = '.next-bench';
const next = path.join(root, 'node_modules/next/dist/bin/next');

function newestSource() {
  let newest = 0;
  const walk = (dir) => {
    if (!existsSync(dir)) return;
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else newest = Math.max(newest, statSync(p).mtimeMs);
    }
  };
  for (const d of ['app', 'components', 'lib', 'workers', 'models']) walk(path.join(root, d));
  return newest;
}

/** Builds .next-bench unless a build newer than every source file is there. */
export function ensureBuild({ quiet = false } = {}) {
  const id = path.join(root, DIST, 'BUILD_ID');
  // EBBCAST_BENCH_REUSE_BUILD=1 measures the build that is there, however old (other people edit the tree meanwhile).
  if (existsSync(id) && (process.env.EBBCAST_BENCH_REUSE_BUILD === '1' || statSync(id).mtimeMs > newestSource())) return;
  if (!quiet) process.stderr.write(`bench: building into ${DIST}…\n`);
  const r = spawnSync(process.execPath, [next, 'build', '--webpack'], {
    cwd: root,
    // No service worker: the load benchmark sends API requests only, and public/sw.js belongs to the e2e build.
    env: { ...process.env, NEXT_DIST_DIR: DIST, NEXT_TELEMETRY_DISABLED: '1', BUILD_ID: `bench${Date.now()}`, EBBCAST_NO_SW: '1' },
    stdio: quiet ? 'ignore' : ['ignore', 'ignore', 'inherit'],
  });
  if (r.status !== 0) throw new Error(`next build failed (${r.status})`);
}

/** Resident memory of a process and its descendants, bytes (from /proc). */
export function rssOfTree(pid) {
  let total = 0;
  const visit = (p) => {
    try {
      const status = readFileSync(`/proc/${p}/status`, 'utf8');
      const m = /VmRSS:\s+(\d+) kB/.exec(status);
      if (m) total += Number(m[1]) * 1024;
      for (const t of readdirSync(`/proc/${p}/task`)) {
        const kids = readFileSync(`/proc/${p}/task/${t}/children`, 'utf8').trim();
        for (const k of kids ? kids.split(/\s+/) : []) visit(Number(k));
      }
    } catch {
      /* the process ended */
    }
  };
  visit(pid);
  return total;
}

/**
 * Starts the server; resolves once /api/health answers.
 * @returns {Promise<{ url: string, pid: number, dataDir: string, dbFile: string, stop: () => Promise<void> }>}
 */
export async function startServer({ port = 3937 } = {}) {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'ebbcast-bench-'));
  const dbFile = path.join(dataDir, 'bench.sqlite');
  const url = `http://127.0.0.1:${port}`;
  // EBBCAST_BENCH_CPU_PROF=<folder>: the server writes a V8 CPU profile there when it stops (where the time goes).
  const prof = process.env.EBBCAST_BENCH_CPU_PROF ? ['--cpu-prof', `--cpu-prof-dir=${path.resolve(process.env.EBBCAST_BENCH_CPU_PROF)}`] : [];
  const child = spawn(process.execPath, [...prof, next, 'start', '-p', String(port), '-H', '127.0.0.1'], {
    cwd: root,
    env: {
      ...process.env, NEXT_DIST_DIR: DIST, NEXTAUTH_URL: url, NEXTAUTH_SECRET: 'bench-secret-not-for-production-0123456789',
      DATABASE_URL: `file:${dbFile}`, EBBCAST_DATA_DIR: dataDir, NEXT_TELEMETRY_DISABLED: '1', NODE_ENV: 'production',
    },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr.on('data', (d) => (stderr = (stderr + d.toString()).slice(-4000)));
  const exited = new Promise((resolve) => child.on('exit', resolve));
  const stop = async () => {
    if (child.exitCode === null) {
      child.kill('SIGTERM');
      const t = setTimeout(() => child.kill('SIGKILL'), 5000);
      await exited;
      clearTimeout(t);
    }
    rmSync(dataDir, { recursive: true, force: true });
  };
  for (let i = 0; i < 600; i++) {
    if (child.exitCode !== null) throw new Error(`next start exited: ${stderr}`);
    try {
      const r = await fetch(`${url}/api/health`);
      if (r.ok) return { url, pid: child.pid, dataDir, dbFile, stop, stderr: () => stderr };
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  await stop();
  throw new Error('the server did not answer /api/health within 120 s');
}

/** Signs in the way the browser does (csrf token, then the credentials callback); returns the cookie header. */
export async function signIn(url, email, password = 'ebbcast-demo') {
  const csrf = await fetch(`${url}/api/auth/csrf`);
  const { csrfToken } = await csrf.json();
  const jar = csrf.headers.getSetCookie().map((c) => c.split(';')[0]);
  const res = await fetch(`${url}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: jar.join('; ') },
    body: new URLSearchParams({ csrfToken, email, password, callbackUrl: `${url}/`, json: 'true' }),
  });
  const session = res.headers.getSetCookie().map((c) => c.split(';')[0]).find((c) => c.startsWith('next-auth.session-token='));
  if (!session) throw new Error(`sign-in of ${email} failed: ${res.status}`);
  return session;
}
