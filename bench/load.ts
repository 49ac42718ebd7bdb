/**
 * Load and soak of a real production server (issue 8): `next start` of a build in .next-bench on
 * 127.0.0.1:3937 with a fresh SQLite file, started and stopped here by its process id
 * (scripts/serve-bench.mjs). autocannon on loopback only, bounded by duration and connections.
 *
 *   npx tsx bench/load.ts                       full form: 50 connections × 30 s each, 10-minute soak
 *   npx tsx bench/load.ts --seconds 5 --connections 10 --soak 20     (the CI form, bench/load.bench.ts)
 *
 * 1. An authenticated read (GET /api/outbreaks/<demo>/tallies?limit=200) under N connections.
 * 2. The sync push under N connections: one device per connection, each push one tally edit with
 *    the next seq (a device edits its own tally on a site of its own).
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

function pushBody(d: Dev): string {
  d.seq++;
  return JSON.stringify({
    deviceId: d.deviceId,
    mutations: [{
      mutationId: randomUUID(), seq: d.seq, entity: 'tally', entityId: d.entityId, op: 'upsert', baseVersion: null,
      payload: { siteId: d.siteId, date: today(), newCases: d.seq % 1000, note: `bench ${d.seq}` }, recordedAt: new Date().toISOString(),
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

    // 1. An authenticated read.
    const read = await autocannon({
      url: `${server.url}/api/outbreaks/${O}/tallies?limit=200`, connections: opts.connections, duration: opts.seconds, headers: { cookie },
    });
    log(`${tag} read: ${read.requests.average.toFixed(0)} req/s, p50 ${read.latency.p50} ms, p99 ${read.latency.p99} ms, errors ${read.errors}, non-2xx ${read.non2xx}`);
    out.push(...rows(`${tag} read tallies`, read, full));

    // 2. The sync push: one device per connection, seqs in order per connection.
    const devices: Dev[] = [];
    for (let i = 0; i < opts.connections; i++) devices.push(await benchDevice(server.url, cookie, i));
    let next = 0;
    const pushErrors: string[] = [];
    const push = await autocannon({
      url: `${server.url}/api/sync/push`, method: 'POST', connections: opts.connections, duration: opts.seconds,
      headers: { cookie, 'content-type': 'application/json' },
      setupClient: (client: AcClient) => {
        const d = devices[next++ % devices.length]!;
        client.setBody(pushBody(d));
        client.on('response', (status: number) => {
          if (status !== 200 && pushErrors.length < 5) pushErrors.push(`status ${status} at seq ${d.seq}`);
          client.setBody(pushBody(d));
        });
      },
    });
    log(`${tag} push: ${push.requests.average.toFixed(0)} req/s, p50 ${push.latency.p50} ms, p99 ${push.latency.p99} ms, errors ${push.errors}, non-2xx ${push.non2xx} ${pushErrors.join('; ')}`);
    out.push(...rows(`${tag} sync push`, push, full));

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
  const walMax = Math.max(...samples.map((s) => s.wal));
  const rssMax = Math.max(...samples.map((s) => s.rss));
  const mb = (b: number) => b / 1024 / 1024;
  log(`soak ${seconds}s, 3 devices every second: ${syncs} syncs, ${failures} failures; RSS ${mb(base.rss).toFixed(1)} → ${mb(last.rss).toFixed(1)} MiB (max ${mb(rssMax).toFixed(1)}; ${growth.toFixed(1)}%); WAL max ${mb(walMax).toFixed(2)} MiB, last ${mb(last.wal).toFixed(2)} MiB`);
  const full = seconds >= 600;
  return [
    { name: `soak ${seconds}s syncs`, value: syncs, unit: 'count' },
    { name: `soak ${seconds}s failures`, value: failures, unit: 'count', ...(full ? { target: '0' } : {}) },
    { name: `soak ${seconds}s RSS growth`, value: growth, unit: '%', ...(full ? { target: '< 20' } : {}) },
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
  runLoad({ seconds: arg('seconds', 30), connections: arg('connections', 50), soakSeconds: arg('soak', 600) })
    .then((r) => {
      for (const row of r) console.log(`${row.name.padEnd(40)} ${row.value.toFixed(2).padStart(12)} ${row.unit.padEnd(6)} ${row.target ?? ''}`);
      process.exit(0);
    })
    .catch((err) => {
      console.error(err);
      process.exit(1);
    });
}
