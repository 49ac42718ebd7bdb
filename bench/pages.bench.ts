/**
 * How light the app is on a field tablet:
 *   - first-load JavaScript of every page, gzip-compressed, from the production build's own
 *     manifests (the root chunks every page loads plus the page's and its layouts' entry chunks;
 *     chunks loaded later on demand, such as the forecast worker, are not first-load);
 *   - offline reload to interactive on the tally entry page, in Chromium with the service worker
 *     active: from reload to the site picker and the count field being usable (median of 5).
 *
 * Needs a build: it reads NEXT_DIST_DIR, else .next-test (scripts/e2e.mjs), else .next. The reload
 * measure starts `next start` on port 3927 with a temporary database; run it under the e2e lock so
 * that no build replaces the folder meanwhile:
 *   flock /tmp/ebbcast-e2e.lock npm run bench -- pages
 */
import { existsSync, mkdtempSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { spawn } from 'node:child_process';
import { tmpdir } from 'node:os';
import path from 'node:path';
import vm from 'node:vm';
import { gzipSync } from 'node:zlib';
import type { BenchRow } from './types';

const root = process.cwd();

function distDir(): string {
  for (const d of [process.env.NEXT_DIST_DIR, '.next-test', '.next']) {
    if (d && existsSync(path.join(root, d, 'BUILD_ID'))) return path.join(root, d);
  }
  throw new Error('No production build found: run `npm run build` (or the e2e script) first.');
}

function* walk(dir: string): Generator<string> {
  for (const name of readdirSync(dir)) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) yield* walk(p);
    else yield p;
  }
}

/** The route a page manifest belongs to: route groups `(x)` dropped. */
const routeOf = (appRel: string) => '/' + appRel.split(path.sep).slice(0, -1).filter((s) => !/^\(.*\)$/.test(s)).join('/');

export function firstLoadJs(dist = distDir()): { route: string; bytes: number; gzip: number; files: number }[] {
  const build = JSON.parse(readFileSync(path.join(dist, 'build-manifest.json'), 'utf8')) as { rootMainFiles: string[] };
  const gz = new Map<string, { raw: number; gzip: number }>();
  const size = (rel: string) => {
    let s = gz.get(rel);
    if (!s) {
      const buf = readFileSync(path.join(dist, rel.replace(/^\/?_next\//, '')));
      s = { raw: buf.length, gzip: gzipSync(buf, { level: 9 }).length };
      gz.set(rel, s);
    }
    return s;
  };
  const appDir = path.join(dist, 'server', 'app');
  const out: { route: string; bytes: number; gzip: number; files: number }[] = [];
  for (const file of walk(appDir)) {
    if (!file.endsWith('page_client-reference-manifest.js')) continue;
    const rel = path.relative(appDir, file);
    if (rel.startsWith('api' + path.sep) || rel.startsWith('_')) continue;
    const sandbox: Record<string, unknown> = {};
    sandbox.globalThis = sandbox;
    sandbox.self = sandbox;
    vm.runInNewContext(readFileSync(file, 'utf8'), sandbox);
    const manifests = sandbox.__RSC_MANIFEST as Record<string, { entryJSFiles?: Record<string, string[]>; clientModules?: Record<string, { chunks: unknown[] }> }>;
    const files = new Set<string>(build.rootMainFiles);
    const route = routeOf(rel);
    // A static page: exactly the scripts its HTML loads (polyfills are nomodule: modern browsers skip them).
    const html = path.join(appDir, `${route === '/' ? 'index' : route.slice(1)}.html`);
    if (existsSync(html)) {
      for (const m of readFileSync(html, 'utf8').matchAll(/<script src="\/_next\/([^"]+\.js)"/g)) if (!m[1]!.includes('polyfills')) files.add(m[1]!);
    } else {
      // A dynamic page: the chunks of every client module its server tree references (webpack builds
      // list them in clientModules; Turbopack builds in entryJSFiles).
      for (const m of Object.values(manifests)) {
        for (const list of Object.values(m.entryJSFiles ?? {})) for (const f of list) if (f.endsWith('.js')) files.add(f);
        for (const mod of Object.values(m.clientModules ?? {})) for (const c of mod.chunks) if (typeof c === 'string' && c.endsWith('.js')) files.add(c);
      }
    }
    let bytes = 0;
    let gzip = 0;
    for (const f of files) {
      const s = size(f);
      bytes += s.raw;
      gzip += s.gzip;
    }
    out.push({ route, bytes, gzip, files: files.size });
  }
  return out.sort((a, b) => a.route.localeCompare(b.route));
}

async function offlineReload(dist: string): Promise<number[]> {
  const { chromium } = await import('@playwright/test');
  const port = 3927;
  const base = `http://127.0.0.1:${port}`;
  const data = mkdtempSync(path.join(tmpdir(), 'ebbcast-bench-pages-'));
  const server = spawn(process.execPath, [path.join(root, 'node_modules/next/dist/bin/next'), 'start', '-p', String(port), '-H', '127.0.0.1'], {
    cwd: root,
    env: {
      ...process.env, NEXT_DIST_DIR: path.relative(root, dist), NEXTAUTH_URL: base, NEXTAUTH_SECRET: 'bench-secret-not-for-production-0123456789',
      DATABASE_URL: `file:${path.join(data, 'bench.sqlite')}`, EBBCAST_DATA_DIR: data, NEXT_TELEMETRY_DISABLED: '1',
    },
    stdio: 'ignore',
  });
  try {
    for (let i = 0; ; i++) {
      try {
        if ((await fetch(`${base}/api/health`)).ok) break;
      } catch {
        /* not up yet */
      }
      if (i > 240) throw new Error('the server did not start');
      await new Promise((r) => setTimeout(r, 500));
    }
    const browser = await chromium.launch({
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    const context = await browser.newContext({ baseURL: base, viewport: { width: 1024, height: 768 }, serviceWorkers: 'allow' });
    const page = await context.newPage();
    await page.goto('/signin');
    await page.getByLabel('E-mail').fill('field@marrowbend.example');
    await page.getByLabel('Password').fill('ebbcast-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByTestId('user-menu').waitFor();
    await page.goto('/entry?outbreak=00000000-0000-4000-8000-00000000a001');
    await page.waitForFunction(async () => Boolean((await navigator.serviceWorker.ready).active && navigator.serviceWorker.controller), null, { timeout: 60_000 });
    await page.getByTestId('site-picker').getByRole('button').first().waitFor({ timeout: 60_000 });
    await context.setOffline(true);
    const times: number[] = [];
    for (let i = 0; i < 6; i++) {
      const t0 = Date.now();
      await page.reload({ waitUntil: 'commit' });
      await page.getByTestId('site-picker').getByRole('button').first().waitFor({ timeout: 30_000 });
      await page.getByLabel('New cases', { exact: true }).waitFor({ state: 'visible' });
      await page.waitForFunction(() => !(document.querySelector('input[name="newCases"]') as HTMLInputElement | null)?.disabled);
      if (i > 0) times.push(Date.now() - t0); // the first reload warms the browser's own caches
    }
    await browser.close();
    return times;
  } finally {
    server.kill('SIGTERM');
  }
}

export default async function pagesBench(): Promise<BenchRow[]> {
  const dist = distDir();
  const rows: BenchRow[] = firstLoadJs(dist).map((p) => ({
    name: `first-load JS ${p.route} (gzip, ${p.files} files)`,
    value: p.gzip / 1024,
    unit: 'kB',
    target: p.route === '/entry' ? '< 200 kB' : undefined,
  }));
  if (process.env.BENCH_SKIP_BROWSER) return rows;
  const times = (await offlineReload(dist)).sort((a, b) => a - b);
  const median = times[Math.floor(times.length / 2)]!;
  rows.push({ name: 'offline reload of /entry to interactive (median of 5)', value: median, unit: 'ms', target: '≤ 1500 ms' });
  rows.push({ name: 'offline reload of /entry to interactive (slowest of 5)', value: times[times.length - 1]!, unit: 'ms' });
  return rows;
}
