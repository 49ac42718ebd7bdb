/**
 * Faults (SYNC.md, "What tests must show"): a server process killed with SIGKILL in the middle of a
 * batch leaves nothing of it behind and the retry succeeds; a lost response resent five times is
 * applied once through the real client engine; a server error mid-push keeps the outbox.
 */
import { TEST_DIR, USING_POSTGRES, call, prepare, sessionCookie } from '../helpers/server';
import { spawn } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS, demoStartDate } from '@/lib/db/demo';
import { addDays } from '@/lib/tallies/dates';
import { queueChange, syncOnce, SyncHttpError, type Transport } from '@/lib/sync/engine';
import { MemoryStore } from '@/lib/sync/memory-store';
import { loadRoutes, routeTransport } from '../unit/sync/route-transport';

type H = Parameters<typeof call>[0];
let push: H, devices: H;
let coordinator: string;
let coordinatorId: string;
const sites: string[] = [];

beforeAll(async () => {
  await prepare();
  push = (await import('@/app/api/sync/push/route')).POST as H;
  devices = (await import('@/app/api/devices/route')).POST as H;
  coordinator = await sessionCookie('coordinator@marrowbend.example');
  const { createSite } = await import('@/lib/db/outbreaks');
  const { loadActor } = await import('@/lib/db/users');
  const { User } = await import('@/models');
  const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
  coordinatorId = u.id;
  const actor = (await loadActor(u.id, u.sessionVersion))!;
  for (let i = 0; i < 20; i++) {
    sites.push((await createSite(actor, { outbreakId: DEMO_IDS.outbreak, name: `Fault site ${i}`, kind: 'village', population: 800, teamId: DEMO_IDS.teamNorth })).id);
  }
});

function bigBatch(deviceId: string, n: number) {
  const start = demoStartDate();
  return {
    deviceId,
    mutations: Array.from({ length: n }, (_, k) => ({
      mutationId: randomUUID(), seq: k + 1, entity: 'tally', entityId: randomUUID(), op: 'upsert', baseVersion: null,
      payload: { siteId: sites[k % 20], date: addDays(start, Math.floor(k / 20)), newCases: k % 13 }, recordedAt: new Date().toISOString(),
    })),
  };
}

/** Runs the child server process until it prints MID (inside the batch's transaction), then SIGKILLs it. */
function killMidBatch(batchFile: string, pauseAt: number): Promise<{ sawMid: boolean; signal: NodeJS.Signals | null }> {
  const tsx = path.join(process.cwd(), 'node_modules/tsx/dist/cli.mjs');
  const child = spawn(process.execPath, [tsx, 'tests/unit/sync/kill-child.ts', path.join(TEST_DIR, 'test.sqlite'), batchFile, 'coordinator@marrowbend.example', String(pauseAt)], {
    cwd: process.cwd(), stdio: ['ignore', 'pipe', 'pipe'],
  });
  let sawMid = false;
  let err = '';
  child.stderr.on('data', (d) => (err += String(d)));
  return new Promise((resolve, reject) => {
    const guard = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`child never reached the middle of the batch: ${err}`));
    }, 90_000);
    child.stdout.on('data', (d) => {
      if (String(d).includes('MID')) {
        sawMid = true;
        child.kill('SIGKILL');
      }
    });
    child.on('exit', (_code, signal) => {
      clearTimeout(guard);
      if (!sawMid) reject(new Error(`child exited before the middle of the batch: ${err}`));
      else resolve({ sawMid, signal });
    });
  });
}

// The killed child writes to this test's SQLite file and the check is SQLite's integrity_check;
// PostgreSQL's crash safety is the database's own (tests/integration/faults.test.ts covers SQLite).
describe.skipIf(USING_POSTGRES)('a server killed in the middle of a batch', () => {
  it('leaves nothing of the batch applied, keeps the file intact, and the retry applies it once', async () => {
    const { db } = await import('@/lib/db/connection');
    const { Tally, AppliedMutation, Device, LedgerEntry } = await import('@/models');
    const deviceId = randomUUID();
    expect((await call(devices, '/api/devices', { method: 'POST', cookie: coordinator, body: { id: deviceId, label: 'Kill test' } })).status).toBe(200);
    const batch = bigBatch(deviceId, 400);
    const file = path.join(TEST_DIR, 'kill-batch.json');
    writeFileSync(file, JSON.stringify(batch));
    const pushesBefore = await LedgerEntry.count({ where: { kind: 'push' } });

    const { sawMid, signal } = await killMidBatch(file, 250);
    expect(sawMid).toBe(true); // tallies of the batch were written inside the still-open transaction
    expect(signal).toBe('SIGKILL');

    const sequelize = await db();
    const [check] = await sequelize.query<{ integrity_check: string }>('PRAGMA integrity_check', { type: QueryTypes.SELECT });
    expect(check!.integrity_check).toBe('ok');
    const ids = batch.mutations.map((m) => m.entityId);
    expect(await Tally.count({ where: { id: ids } })).toBe(0);
    expect(await AppliedMutation.count({ where: { deviceId } })).toBe(0);
    expect(Number((await Device.findByPk(deviceId))!.highestSeq)).toBe(0);
    expect(await LedgerEntry.count({ where: { kind: 'push' } })).toBe(pushesBefore);

    // The device retries the same batch against the restarted server (this process): all of it, once.
    const retry = await call(push, '/api/sync/push', { method: 'POST', cookie: coordinator, body: batch });
    expect(retry.status).toBe(200);
    expect(retry.body.results.filter((r: { fate: string }) => r.fate === 'applied')).toHaveLength(400);
    expect(retry.body.highestSeq).toBe(400);
    expect(await Tally.count({ where: { id: ids } })).toBe(400);
    expect(await AppliedMutation.count({ where: { deviceId } })).toBe(400);
    const again = await call(push, '/api/sync/push', { method: 'POST', cookie: coordinator, body: batch });
    expect(again.body).toEqual(retry.body);
    expect(await Tally.count({ where: { id: ids } })).toBe(400);
  }, 120_000);
});

describe('the client engine under a lossy network', () => {
  it('applies a push whose response is lost and resent 5 times exactly once', async () => {
    const { Tally, AppliedMutation } = await import('@/models');
    const routes = await loadRoutes();
    const real = routeTransport(routes, () => coordinator);
    let lost = 0;
    const lossy: Transport = {
      ...real,
      async push(body) {
        const res = await real.push(body); // the server applies it …
        if (lost < 5) {
          lost++;
          throw new SyncHttpError(0, 'timeout', 'response lost'); // … and the answer never arrives
        }
        return res;
      },
    };
    const store = new MemoryStore(randomUUID(), coordinatorId);
    const id = randomUUID();
    const values = { siteId: sites[0]!, date: addDays(demoStartDate(), 22), newCases: 17, recoveries: null, deaths: null, admissions: null, note: null };
    await queueChange(store, { entity: 'tally', op: 'upsert', record: { id, version: 0, changeSeq: 0, deletedAt: null, outbreakId: DEMO_IDS.outbreak, ...values }, payload: values, userId: coordinatorId });
    const reports = [];
    for (let i = 0; i < 6; i++) reports.push(await syncOnce(store, lossy));
    expect(reports.slice(0, 5).every((r) => !r.ok && r.error === 'offline')).toBe(true);
    expect(await store.outboxCount()).toBe(0); // the sixth answer arrived
    expect(reports[5]!.ok).toBe(true);
    expect(reports[5]!.pushed.applied).toBe(1); // the stored answer of the first delivery
    const rows = await Tally.findAll({ where: { id } });
    expect(rows).toHaveLength(1);
    expect(rows[0]!.version).toBe(1);
    expect(await AppliedMutation.count({ where: { entityId: id } })).toBe(1);
    expect(store.live('tally').find((r) => r.id === id)?.version).toBe(1);
  });

  it('keeps the whole outbox when the server fails mid-push, and empties it when the server is back', async () => {
    const routes = await loadRoutes();
    const real = routeTransport(routes, () => coordinator);
    let down = true;
    const flaky: Transport = {
      ...real,
      async push(body) {
        if (down) throw new SyncHttpError(500, 'internal', 'Something went wrong on the server.');
        return real.push(body);
      },
    };
    const store = new MemoryStore(randomUUID(), coordinatorId);
    for (let d = 0; d < 5; d++) {
      const values = { siteId: sites[1]!, date: addDays(demoStartDate(), 19 + d - 4), newCases: d, recoveries: null, deaths: null, admissions: null, note: null };
      await queueChange(store, { entity: 'tally', op: 'upsert', record: { id: randomUUID(), version: 0, changeSeq: 0, deletedAt: null, outbreakId: DEMO_IDS.outbreak, ...values }, payload: values, userId: coordinatorId });
    }
    const failed = await syncOnce(store, flaky);
    expect(failed.ok).toBe(false);
    expect(failed.error).toBe('server');
    expect(await store.outboxCount()).toBe(5);
    down = false;
    const ok = await syncOnce(store, flaky);
    expect(ok.ok).toBe(true);
    expect(ok.pushed.applied + ok.pushed.duplicate + ok.pushed.conflict).toBe(5);
    expect(await store.outboxCount()).toBe(0);
  });

  it('waits on 401 (session ended offline) with the outbox intact and says to sign in', async () => {
    const routes = await loadRoutes();
    const expired = routeTransport(routes, () => 'next-auth.session-token=expired');
    const store = new MemoryStore(randomUUID(), coordinatorId);
    const values = { siteId: sites[2]!, date: addDays(demoStartDate(), 21), newCases: 2, recoveries: null, deaths: null, admissions: null, note: null };
    await queueChange(store, { entity: 'tally', op: 'upsert', record: { id: randomUUID(), version: 0, changeSeq: 0, deletedAt: null, outbreakId: DEMO_IDS.outbreak, ...values }, payload: values, userId: coordinatorId });
    const r = await syncOnce(store, expired);
    expect(r.ok).toBe(false);
    expect(r.error).toBe('unauthenticated');
    expect(r.message).toMatch(/Sign in to sync/);
    expect(await store.outboxCount()).toBe(1);
    expect(store.live('tally')).toHaveLength(1); // local work is still there
  });
});
