/**
 * Faults (issue 8). SQLite-specific, so skipped on the PostgreSQL pass.
 * 1. A sync client process killed with SIGKILL at random moments while it pushes 200 batches:
 *    every batch is in whole or not at all after each kill, `PRAGMA integrity_check` says ok, the
 *    restarted client completes, and every mutation is recorded exactly once (SYNC.md 3).
 * 2. The database opened read-only, and the database full (`PRAGMA max_page_count`): writes answer
 *    503 `unavailable` with a message, nothing changes, and the same request succeeds afterwards.
 */
import { TEST_DIR, USING_POSTGRES, call, prepare, sessionCookie } from '../helpers/server';
import { spawn, type ChildProcess } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';
import sqlite3 from 'sqlite3';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import { fingerprint } from './route-matrix.fixtures';

const BATCHES = 200;
const PER_BATCH = 5;
const TODAY = new Date().toISOString().slice(0, 10);

let sequelize: Sequelize;

beforeAll(async () => {
  await prepare();
  const { db } = await import('@/lib/db/connection');
  sequelize = await db();
});

const q = <T extends object>(sql: string, replacements?: unknown[]) => sequelize.query<T>(sql, { type: QueryTypes.SELECT, replacements });

async function integrity(): Promise<string> {
  const rows = await q<{ integrity_check: string }>('PRAGMA integrity_check');
  return rows.map((r) => r.integrity_check).join('; ');
}

/**
 * The pusher, bundled once with esbuild (installed with tsx): starting node on one file takes a
 * fraction of what compiling TypeScript at every restart would, and there is one process to kill.
 */
let pusherJs = '';
async function bundlePusher(): Promise<string> {
  if (pusherJs) return pusherJs;
  const esbuild = await import('esbuild');
  pusherJs = path.join(TEST_DIR, 'fault-pusher.cjs');
  await esbuild.build({
    entryPoints: [path.join(process.cwd(), 'scripts/fault-pusher.ts')], outfile: pusherJs, bundle: true, platform: 'node', format: 'cjs',
    packages: 'external', tsconfig: path.join(process.cwd(), 'tsconfig.json'), logLevel: 'silent',
  });
  return pusherJs;
}

/** Starts the pusher; resolves with the process once it printed `ready`. */
function startPusher(planFile: string): Promise<{ child: ChildProcess; out: string[]; exited: Promise<number | null> }> {
  // One node process (not the tsx wrapper, whose child would live on after a SIGKILL of the wrapper).
  const child = spawn(process.execPath, [pusherJs, planFile], {
    cwd: process.cwd(),
    env: { ...process.env, DATABASE_URL: process.env.DATABASE_URL, NODE_PATH: path.join(process.cwd(), 'node_modules') },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const out: string[] = [];
  let err = '';
  const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
  return new Promise((resolve, reject) => {
    child.stdout!.on('data', (d: Buffer) => {
      for (const line of d.toString().split('\n').filter(Boolean)) {
        out.push(line);
        if (line === 'ready') resolve({ child, out, exited });
      }
    });
    child.stderr!.on('data', (d: Buffer) => (err += d.toString()));
    void exited.then((code) => {
      if (!out.includes('ready')) reject(new Error(`pusher exited ${code} before ready: ${err.slice(0, 2000)}`));
    });
  });
}

describe.skipIf(USING_POSTGRES)('a client killed at random points during 200 pushes', () => {
  it('leaves every batch all or nothing, the file intact, and completes on retry', async () => {
    const { User } = await import('@/models');
    const field = (await User.findOne({ where: { email: 'field@marrowbend.example' } }))!;
    const sites = [DEMO_IDS.alderCamp, DEMO_IDS.northgateSchool, DEMO_IDS.hollinCrossing];
    const deviceId = randomUUID();
    const batches = Array.from({ length: BATCHES }, (_, b) =>
      Array.from({ length: PER_BATCH }, (_, j) => {
        const seq = b * PER_BATCH + j + 1;
        return {
          mutationId: randomUUID(), seq, entity: 'tally', entityId: randomUUID(), op: 'upsert' as const, baseVersion: null,
          // Site-days repeat across batches: later ones become conflicts, which are recorded too.
          payload: { siteId: sites[seq % 3]!, date: TODAY, newCases: seq, note: `fault ${seq}` }, recordedAt: new Date().toISOString(),
        };
      }),
    );
    const planFile = path.join(TEST_DIR, 'fault-plan.json');
    writeFileSync(planFile, JSON.stringify({ email: field.email, deviceId, batches }));
    const ids = batches.map((b) => b.map((m) => m.mutationId));
    await bundlePusher();

    /** Recorded mutations per batch: each must be 0 or PER_BATCH. */
    async function perBatch(): Promise<number[]> {
      const rows = await q<{ mutation_id: string }>('SELECT mutation_id FROM applied_mutations WHERE device_id = ?', [deviceId]);
      const have = new Set(rows.map((r) => r.mutation_id));
      return ids.map((b) => b.filter((id) => have.has(id)).length);
    }

    let kills = 0;
    let midBatchKills = 0;
    let rounds = 0;
    let done = false;
    let seed = 0x2026;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    while (!done && rounds < 400) {
      rounds++;
      const p = await startPusher(planFile);
      // Kill at a random moment after it connected: 0–1500 ms, so most kills land inside a push.
      const delay = Math.floor(rand() * 1500);
      const finished = await Promise.race([p.exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), delay))]);
      if (finished || p.out.includes('done')) {
        done = p.out.includes('done');
        await p.exited;
      } else {
        const before = (await perBatch()).filter((n) => n === PER_BATCH).length;
        p.child.kill('SIGKILL');
        await p.exited;
        kills++;
        const counts = await perBatch();
        const partial = counts.filter((n) => n !== 0 && n !== PER_BATCH);
        expect(partial, `after kill ${kills}: a batch was half applied`).toEqual([]);
        expect(await integrity()).toBe('ok');
        const pushedLines = p.out.filter((l) => l.startsWith('pushed')).length;
        // A batch that committed without the client hearing of it (killed between commit and print) is the "lost answer" case.
        if (counts.filter((n) => n === PER_BATCH).length > before + pushedLines) midBatchKills++;
      }
    }
    expect(done, 'the client completed all batches').toBe(true);
    const counts = await perBatch();
    expect(counts.every((n) => n === PER_BATCH)).toBe(true);
    // Every mutation recorded once, seqs 1..1000 with no gap, and the device's high-water mark at the end.
    const rows = await q<{ seq: number; n: number }>('SELECT seq, COUNT(*) AS n FROM applied_mutations WHERE device_id = ? GROUP BY seq ORDER BY seq', [deviceId]);
    expect(rows.length).toBe(BATCHES * PER_BATCH);
    expect(rows.every((r, i) => Number(r.seq) === i + 1 && Number(r.n) === 1)).toBe(true);
    const [dev] = await q<{ highest_seq: number }>('SELECT highest_seq FROM devices WHERE id = ?', [deviceId]);
    expect(Number(dev!.highest_seq)).toBe(BATCHES * PER_BATCH);
    // One push ledger row per batch: a batch killed before its commit left no row, and none was written twice.
    const [pushes] = await q<{ n: number }>("SELECT COUNT(*) AS n FROM ledger_entries WHERE kind = 'push' AND device_id = ?", [deviceId]);
    expect(Number(pushes!.n)).toBe(BATCHES);
    // Every mutation the server says it applied is a live tally with that id.
    const applied = await q<{ entity_id: string }>("SELECT entity_id FROM applied_mutations WHERE device_id = ? AND fate = 'applied'", [deviceId]);
    const [tallies] = await q<{ n: number }>(`SELECT COUNT(*) AS n FROM tallies WHERE id IN (${applied.map(() => '?').join(',') || "''"})`, applied.map((a) => a.entity_id));
    expect(Number(tallies!.n)).toBe(applied.length);
    expect(await integrity()).toBe('ok');
    const { verifyLedger } = await import('@/lib/db/ledger');
    expect((await verifyLedger()).ok).toBe(true);
    console.log(`faults: ${BATCHES} batches of ${PER_BATCH}, ${rounds} client runs, ${kills} SIGKILLs (${midBatchKills} between a commit and its answer), 0 half-applied batches, integrity_check ok, ${applied.length} applied + ${BATCHES * PER_BATCH - applied.length} conflicts/duplicates`);
    expect(kills).toBeGreaterThanOrEqual(10);
  }, 900_000);
});

describe.skipIf(USING_POSTGRES)('a read-only or full database', () => {
  type Cm = { getConnection: (o?: unknown) => Promise<sqlite3.Database>; connections: Record<string, sqlite3.Database> };
  const cm = () => sequelize.connectionManager as unknown as Cm;
  const closeCached = async () => {
    for (const [k, c] of Object.entries(cm().connections)) {
      await new Promise<void>((r) => c.close(() => r()));
      delete cm().connections[k];
    }
  };

  async function writeAttempts() {
    const cookie = await sessionCookie('coordinator@marrowbend.example');
    const sites = await import('@/app/api/outbreaks/[id]/sites/route');
    const tallies = await import('@/app/api/tallies/route');
    const name = `Fault site ${randomUUID().slice(0, 6)}`;
    return [
      () => call(sites.POST as never, `/api/outbreaks/${DEMO_IDS.outbreak}/sites`, { method: 'POST', cookie, params: { id: DEMO_IDS.outbreak }, body: { name, kind: 'camp', population: 10, teamId: DEMO_IDS.teamNorth } }),
      () => call(tallies.POST as never, '/api/tallies', { method: 'POST', cookie, body: { siteId: DEMO_IDS.fennelVillage, date: TODAY, newCases: 77, note: 'x'.repeat(280) } }),
    ];
  }

  it('answers 503 with a message when the file is read-only, changes nothing, and works again after', async () => {
    const attempts = await writeAttempts();
    const before = await fingerprint();
    const opts = (sequelize as unknown as { options: { dialectOptions?: { mode?: number } } }).options;
    opts.dialectOptions = { mode: sqlite3.OPEN_READONLY };
    await closeCached();
    try {
      for (const a of attempts) {
        const res = await a();
        expect(res.status, JSON.stringify(res.body)).toBe(503);
        expect(res.body.error.code).toBe('unavailable');
        expect(res.body.error.message).toMatch(/read-only/);
      }
      // Reads still work while writes are refused.
      const { GET } = await import('@/app/api/health/route');
      expect((await call(GET as never, '/api/health')).status).toBe(200);
    } finally {
      opts.dialectOptions = {};
      await closeCached();
    }
    expect(await fingerprint()).toBe(before);
    expect(await integrity()).toBe('ok');
    for (const a of attempts) expect((await a()).status).toBe(200);
  });

  it('answers 503 with a message when the disk is full, changes nothing, and works again after', async () => {
    const attempts = await writeAttempts();
    // Make the file as full as it may get: the page limit at the current size, free pages used up.
    const c = cm();
    const original = c.getConnection.bind(c);
    let limit = true;
    c.getConnection = async (o?: unknown) => {
      const conn = await original(o);
      if (limit) {
        await new Promise<void>((resolve, reject) =>
          conn.get('PRAGMA page_count', (err, row: { page_count: number }) => {
            if (err) return reject(err);
            conn.exec(`PRAGMA max_page_count = ${row.page_count}`, (e) => (e ? reject(e) : resolve()));
          }),
        );
      }
      return conn;
    };
    await closeCached();
    const { DEMO_IDS: ids } = await import('@/lib/db/demo');
    const push = await import('@/app/api/sync/push/route');
    const { registerDevice } = await import('@/lib/db/sync');
    const { loadActor } = await import('@/lib/db/users');
    const { User } = await import('@/models');
    const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
    limit = false;
    const device = (await registerDevice((await loadActor(u.id, u.sessionVersion))!, { id: randomUUID(), label: 'Full-disk tablet' })).id;
    limit = true;
    await closeCached();
    // A batch big enough to need new pages: 500 tallies with long notes.
    const big = {
      deviceId: device,
      mutations: Array.from({ length: 500 }, (_, i) => ({
        mutationId: randomUUID(), seq: i + 1, entity: 'tally', entityId: randomUUID(), op: 'upsert', baseVersion: null,
        payload: { siteId: ids.lakeshoreWard, date: TODAY, newCases: i, note: `n${i} ${'y'.repeat(270)}` }, recordedAt: new Date().toISOString(),
      })),
    };
    const cookie = await sessionCookie('coordinator@marrowbend.example');
    const before = await fingerprint();
    try {
      const res = await call(push.POST as never, '/api/sync/push', { method: 'POST', cookie, body: big });
      expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(503);
      expect(res.body.error.code).toBe('unavailable');
      expect(res.body.error.message).toMatch(/disk space/);
    } finally {
      limit = false;
      c.getConnection = original;
      await closeCached();
    }
    expect(await fingerprint()).toBe(before);
    expect(await integrity()).toBe('ok');
    // The outbox sends the same batch again once there is room: it is applied whole.
    const again = await call(push.POST as never, '/api/sync/push', { method: 'POST', cookie, body: big });
    expect(again.status).toBe(200);
    expect(again.body.results).toHaveLength(500);
    void attempts;
  });
});
