/**
 * Load and soak of a real production server (issue 8): `next start` of a build in .next-bench on
 * 127.0.0.1:3937 with a fresh SQLite file, started and stopped here by its process id
 * (scripts/serve-bench.mjs). autocannon on loopback only, bounded by duration and connections.
 *
 *   npx tsx bench/load.ts                       full form: 50 connections × 30 s each, 10-minute soak
 *   npx tsx bench/load.ts --seconds 5 --connections 10 --soak 20     (the CI form, bench/load.bench.ts)
 *
 * 0. The floor, in the same run: /api/health (no session, one SELECT 1) and /api/me (the session
 *    check alone) under N connections: what `next start` itself costs here.
 * 1. An authenticated read (GET /api/outbreaks/<demo>/tallies?limit=200) under N connections.
 * 2. The sync push under N connections: one device per connection, each push one tally edit with
 *    the next seq (a device edits its own tally on a site of its own). With a sweep (the full form;
 *    `--no-sweep` skips it), both again at 5…40 connections for 10 s each: the most connections
 *    served within p99 ≤ 200 ms.
 * 3. Soak: 3 simulated devices, each pushing one mutation and pulling every second; the server's
 *    resident memory (its process tree) and the SQLite WAL file are sampled every 5 s.
 */
// @ts-expect-error autocannon ships no type declarations
import autocannonUntyped from 'autocannon';
import { randomUUID } from 'node:crypto';
import { statSync } from 'node:fs';
import type { BenchRow } from './types';
// @ts-expect-error plain ESM helper without types
import { ensureBuild, rssOfTree, signIn, startServer } from '../scripts/serve-bench.mjs';

const O = '00000000-0000-4000-8000-00000000a001';

export interface LoadOptions {
  seconds: number;
  connections: number;
  soakSeconds: number;
  /** Connection counts to try after the main runs, each for `sweepSeconds` (default 10). */
  sweep?: number[];
  sweepSeconds?: number;
  port?: number;
  log?: (line: string) => void;
}

interface Server {
  url: string;
  pid: number;
  dbFile: string;
  stop: () => Promise<void>;
}

interface AcResult {
  requests: { average: number };
  latency: { p50: number; p99: number };
  errors: number;
  timeouts: number;
  non2xx: number;
}
interface AcClient {
  setBody(body: string): void;
  on(event: 'response', fn: (status: number) => void): void;
}
const autocannon = autocannonUntyped as (opts: Record<string, unknown>) => Promise<AcResult>;

const today = () => new Date().toISOString().slice(0, 10);

async function json(url: string, cookie: string, method: string, body?: unknown): Promise<any> {
  const res = await fetch(url, { method, headers: { cookie, ...(body ? { 'content-type': 'application/json' } : {}) }, body: body ? JSON.stringify(body) : undefined });
  const text = await res.text();
  if (!res.ok) throw new Error(`${method} ${url}: ${res.status} ${text.slice(0, 300)}`);
  return JSON.parse(text);
}

/** A device of the coordinator with a site of its own, so its pushes edit one tally of its own. */
async function benchDevice(url: string, cookie: string, n: number) {
  const site = await json(`${url}/api/outbreaks/${O}/sites`, cookie, 'POST', { name: `Bench site ${n} ${randomUUID().slice(0, 6)}`, kind: 'camp', population: 500 });
  const device = await json(`${url}/api/devices`, cookie, 'POST', { id: randomUUID(), label: `Bench tablet ${n}` });
  return { deviceId: device.device.id as string, siteId: site.site.id as string, entityId: randomUUID(), seq: 0 };
}

type Dev = Awaited<ReturnType<typeof benchDevice>>;

/** The device's next push: seq is the last one the server accepted plus one (`d.seq` counts accepted ones). */
function pushBody(d: Dev): string {
  const seq = d.seq + 1;
  return JSON.stringify({
    deviceId: d.deviceId,
    mutations: [{
      mutationId: randomUUID(), seq, entity: 'tally', entityId: d.entityId, op: 'upsert', baseVersion: null,
      payload: { siteId: d.siteId, date: today(), newCases: seq % 1000, note: `bench ${seq}` }, recordedAt: new Date().toISOString(),
    }],
  });
}

function rows(prefix: string, r: AcResult, target: boolean): BenchRow[] {
  const errors = r.errors + r.timeouts + r.non2xx;
  return [
    { name: `${prefix} requests/s`, value: r.requests.average, unit: 'req/s' },
    { name: `${prefix} p50`, value: r.latency.p50, unit: 'ms' },
    { name: `${prefix} p99`, value: r.latency.p99, unit: 'ms', ...(target ? { target: '≤ 200' } : {}) },
    { name: `${prefix} errors`, value: errors, unit: 'count', ...(target ? { target: '0' } : {}) },
  ];
}

export async function runLoad(opts: LoadOptions): Promise<BenchRow[]> {
  const log = opts.log ?? ((l: string) => process.stderr.write(`${l}\n`));
  ensureBuild();
  const server = (await startServer({ port: opts.port ?? 3937 })) as Server;
  const out: BenchRow[] = [];
  try {
    const cookie = await signIn(server.url, 'coordinator@marrowbend.example');
    const full = opts.seconds >= 30 && opts.connections >= 50;
    const tag = `load ${opts.connections}c×${opts.seconds}s`;
    const say = (what: string, r: AcResult, extra = '') =>
      log(`${what}: ${r.requests.average.toFixed(0)} req/s, p50 ${r.latency.p50} ms, p99 ${r.latency.p99} ms, errors ${r.errors}, non-2xx ${r.non2xx}${extra}`);
    const read = (connections: number, duration: number) =>
      autocannon({ url: `${server.url}/api/outbreaks/${O}/tallies?limit=200`, connections, duration, headers: { cookie } });

    // The devices of the push runs: one per connection, seqs in order per device.
    const devices: Dev[] = [];
    for (let i = 0; i < Math.max(opts.connections, ...(opts.sweep ?? [])); i++) devices.push(await benchDevice(server.url, cookie, i));
    const pushErrors: string[] = [];
    const push = async (connections: number, duration: number) => {
      // A run that stops mid-request leaves pushes that the server still applies after autocannon
      // has returned: let them land, then take each device's last accepted seq from the server.
      await new Promise((r) => setTimeout(r, 3000));
      const listed = (await json(`${server.url}/api/devices`, cookie, 'GET')) as { devices: { id: string; highestSeq: number }[] };
      const highest = new Map(listed.devices.map((d) => [d.id, d.highestSeq]));
      for (const d of devices) d.seq = highest.get(d.deviceId) ?? d.seq;
      let next = 0;
      return autocannon({
        url: `${server.url}/api/sync/push`, method: 'POST', connections, duration,
        headers: { cookie, 'content-type': 'application/json' },
        setupClient: (client: AcClient) => {
          const d = devices[next++ % connections]!;
          client.setBody(pushBody(d));
          client.on('response', (status: number) => {
            // A 409 means the seq was taken (an answer lost at the end of the previous run): move on.
            if (status === 200 || status === 409) d.seq++;
            if (status !== 200 && pushErrors.length < 5) pushErrors.push(`status ${status} at seq ${d.seq}`);
            client.setBody(pushBody(d));
          });
        },
      });
    };

    // 0. The floor: what `next start` itself costs on this machine, in the same run. /api/health is
    // a route with no session and one `SELECT 1`; /api/me adds the session check (JWT, actor re-read).
    const health = await autocannon({ url: `${server.url}/api/health`, connections: opts.connections, duration: opts.seconds });
    say(`${tag} floor /api/health`, health);
    out.push(...rows(`${tag} floor /api/health`, health, false));
    const me = await autocannon({ url: `${server.url}/api/me`, connections: opts.connections, duration: opts.seconds, headers: { cookie } });
    say(`${tag} floor /api/me`, me);
    out.push(...rows(`${tag} floor /api/me`, me, false));

    // How many connections a route still serves within p99 ≤ 200 ms (capacity planning): the
    // same route again at each count of the sweep, 10 s each.
    const sweep = async (what: string, run: (c: number, d: number) => Promise<AcResult>) => {
      if (!opts.sweep?.length) return;
      let best = 0;
      for (const c of opts.sweep) {
        const x = await run(c, opts.sweepSeconds ?? 10);
        say(`sweep ${what} ${c}c`, x);
        out.push({ name: `sweep ${what} ${c}c p99`, value: x.latency.p99, unit: 'ms' });
        if (x.latency.p99 <= 200 && x.errors + x.timeouts + x.non2xx === 0) best = Math.max(best, c);
      }
      out.push({ name: `${what}: most connections with p99 ≤ 200 ms`, value: best, unit: 'conns' });
    };

    // 1. An authenticated read: a page of up to 200 tallies of the demo outbreak (before the
    // pushes, which add a tally per bench device to the same outbreak).
    const r = await read(opts.connections, opts.seconds);
    say(`${tag} read`, r);
    out.push(...rows(`${tag} read tallies`, r, full));
    await sweep('read tallies', read);

    // 2. The sync push: each request one tally edit of the connection's own device.
    const p = await push(opts.connections, opts.seconds);
    say(`${tag} push`, p, pushErrors.length ? ` ${pushErrors.join('; ')}` : '');
    out.push(...rows(`${tag} sync push`, p, full));
    await sweep('sync push', push);

    // 3. Soak: 3 devices syncing every second.
    const soak = await runSoak(server, cookie, opts.soakSeconds, log);
    out.push(...soak);
  } finally {
    await server.stop();
  }
  return out;
}

async function runSoak(server: Server, cookie: string, seconds: number, log: (l: string) => void): Promise<BenchRow[]> {
  const devs = await Promise.all([0, 1, 2].map((i) => benchDevice(server.url, cookie, 100 + i)));
  const cursors = [0, 0, 0];
  let syncs = 0;
  let failures = 0;
  const wal = () => {
    try {
      return statSync(`${server.dbFile}-wal`).size;
    } catch {
      return 0;
    }
  };
  const samples: { t: number; rss: number; wal: number }[] = [];
  const started = Date.now();
  const sample = () => samples.push({ t: (Date.now() - started) / 1000, rss: rssOfTree(server.pid), wal: wal() });
  // Warm up for 10 s (or a fifth of a short soak) before the baseline: the first requests load code.
  const warm = Math.min(10, seconds / 5) * 1000;
  let baseline: { rss: number; wal: number } | null = null;
  const end = started + seconds * 1000;
  let tick = 0;
  while (Date.now() < end) {
    const t0 = Date.now();
    await Promise.all(devs.map(async (d, i) => {
      try {
        const pushed = await fetch(`${server.url}/api/sync/push`, { method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: pushBody(d) });
        if (!pushed.ok) throw new Error(String(pushed.status));
        await pushed.arrayBuffer();
        d.seq++;
        for (let more = true; more; ) {
          const page = await fetch(`${server.url}/api/sync/pull?cursor=${cursors[i]}&limit=500`, { headers: { cookie, 'x-device-id': d.deviceId } });
          if (!page.ok) throw new Error(String(page.status));
          const body = (await page.json()) as { cursor: number; more: boolean };
          cursors[i] = body.cursor;
          more = body.more;
        }
        syncs++;
      } catch {
        failures++;
      }
    }));
    if (!baseline && Date.now() - started >= warm) {
      sample();
      baseline = { rss: samples.at(-1)!.rss, wal: samples.at(-1)!.wal };
    }
    if (tick++ % 5 === 0) sample();
    await new Promise((r) => setTimeout(r, Math.max(0, 1000 - (Date.now() - t0))));
  }
  sample();
  const last = samples.at(-1)!;
  const base = baseline ?? samples[0]!;
  const growth = ((last.rss - base.rss) / base.rss) * 100;
  // Right after the load runs the server still holds their garbage, so the end is also compared
  // with the lowest RSS of the soak's first half (after the warm-up): a leak shows against that.
  const firstHalf = samples.filter((x) => x.t * 1000 >= warm && x.t <= seconds / 2);
  const settled = firstHalf.length ? Math.min(...firstHalf.map((x) => x.rss)) : base.rss;
  const growthSettled = ((last.rss - settled) / settled) * 100;
  const walMax = Math.max(...samples.map((s) => s.wal));
  const rssMax = Math.max(...samples.map((s) => s.rss));
  const mb = (b: number) => b / 1024 / 1024;
  log(`soak ${seconds}s, 3 devices every second: ${syncs} syncs, ${failures} failures; RSS ${mb(base.rss).toFixed(1)} → ${mb(last.rss).toFixed(1)} MiB (max ${mb(rssMax).toFixed(1)}; ${growth.toFixed(1)}%; against the first half's lowest, ${mb(settled).toFixed(1)} MiB: ${growthSettled.toFixed(1)}%); WAL max ${mb(walMax).toFixed(2)} MiB, last ${mb(last.wal).toFixed(2)} MiB`);
  const full = seconds >= 600;
  return [
    { name: `soak ${seconds}s syncs`, value: syncs, unit: 'count' },
    { name: `soak ${seconds}s failures`, value: failures, unit: 'count', ...(full ? { target: '0' } : {}) },
    { name: `soak ${seconds}s RSS growth`, value: growth, unit: '%', ...(full ? { target: '< 20' } : {}) },
    { name: `soak ${seconds}s RSS growth from the first half's lowest`, value: growthSettled, unit: '%', ...(full ? { target: '< 20' } : {}) },
    { name: `soak ${seconds}s RSS at end`, value: mb(last.rss), unit: 'MiB' },
    { name: `soak ${seconds}s WAL max`, value: mb(walMax), unit: 'MiB' },
    { name: `soak ${seconds}s WAL at end`, value: mb(last.wal), unit: 'MiB' },
  ];
}

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? Number(process.argv[i + 1]) : fallback;
}

if (process.argv[1] && /bench\/load\.ts$/.test(process.argv[1])) {
  const sweep = process.argv.includes('--no-sweep') ? [] : [5, 10, 20, 30, 40];
  runLoad({ seconds: arg('seconds', 30), connections: arg('connections', 50), soakSeconds: arg('soak', 600), sweep, sweepSeconds: arg('sweep-seconds', 10) })
    .then((r) => {
      for (const row of r) console.log(`${row.name.padEnd(40)} ${row.value.toFixed(2).padStart(12)} ${row.unit.padEnd(6)} ${row.target ?? ''}`);
      process.exit(0);
    })
    .catch((err) => {
      console.error(err);
      process.exit(1);
    });
}
