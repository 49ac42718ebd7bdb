/**
 * Sync benchmarks on a temporary SQLite file (disk, WAL, synchronous=FULL), through the real route
 * handlers and the real client engine (on its in-memory store):
 *   - push of 5,000 queued tallies end to end (10 batches of 500: JSON, validation, one transaction
 *     each, answers applied to the device's store), checked to be applied exactly once;
 *   - pull of 50,000 changes into an empty device (pages of 2,000).
 *
 *   npm run bench -- sync
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import type { BenchRow } from './types';

export default async function syncBench(): Promise<BenchRow[]> {
  const dir = mkdtempSync(path.join(tmpdir(), 'ebbcast-bench-sync-'));
  process.env.DATABASE_URL = `file:${path.join(dir, 'bench.sqlite')}`;
  process.env.NEXTAUTH_SECRET ??= 'bench-secret-0123456789abcdef0123456789';
  process.env.NEXTAUTH_URL ??= 'http://localhost:3000';
  const { NextRequest } = await import('next/server');
  const { encode } = await import('next-auth/jwt');
  const { prepareDatabase } = await import('@/lib/db/setup');
  const { writeTx, closeDb } = await import('@/lib/db/connection');
  const { nextChangeSeq } = await import('@/lib/db/counters');
  const { Outbreak, Site, Tally, ServerCounter, OutbreakMember, User, AppliedMutation } = await import('@/models');
  const { queueChange, syncOnce, SyncHttpError } = await import('@/lib/sync/engine');
  type Transport = import('@/lib/sync/engine').Transport;
  const { MemoryStore } = await import('@/lib/sync/memory-store');
  const push = (await import('@/app/api/sync/push/route')).POST;
  const pull = (await import('@/app/api/sync/pull/route')).GET;
  const devices = (await import('@/app/api/devices/route')).POST;
  const { DEMO_IDS } = await import('@/lib/db/demo');
  const { addDays, utcToday } = await import('@/lib/tallies/dates');

  await prepareDatabase({ quiet: true });
  const coord = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
  const cookie = `next-auth.session-token=${await encode({ token: { sub: coord.id, email: coord.email, sessionVersion: coord.sessionVersion }, secret: process.env.NEXTAUTH_SECRET! })}`;

  // An outbreak of 50 sites and 120 days, so 5,000 new tallies fit (site × day is unique).
  const outbreakId = randomUUID();
  const start = addDays(utcToday(), -120);
  const sites = Array.from({ length: 50 }, () => randomUUID());
  await writeTx(async (t) => {
    const stamp = async () => ({ version: 1, changeSeq: await nextChangeSeq(t), updatedBy: null, deviceId: null });
    await Outbreak.create({ id: outbreakId, name: 'Bench', disease: 'ILI', area: 'Bench', population: 100000, startDate: start, beds: null, ...(await stamp()) }, { transaction: t });
    for (const [i, id] of sites.entries()) {
      await Site.create({ id, outbreakId, teamId: DEMO_IDS.teamNorth, name: `Bench ${i}`, kind: 'camp', population: 2000, ...(await stamp()) }, { transaction: t });
    }
    await OutbreakMember.create({ id: randomUUID(), outbreakId, userId: coord.id }, { transaction: t });
  });

  const req = (url: string, init: { method?: string; body?: unknown; headers?: Record<string, string> } = {}) =>
    new NextRequest(new URL(url, 'http://localhost:3000'), {
      method: init.method ?? 'GET',
      headers: { cookie, ...(init.body !== undefined ? { 'content-type': 'application/json' } : {}), ...(init.headers ?? {}) },
      body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
    });
  const ctx = { params: Promise.resolve({}) };
  const answer = async <T>(res: Response): Promise<T> => {
    const body = (await res.json()) as T & { error?: { code: string; message: string } };
    if (!res.ok) throw new SyncHttpError(res.status, body.error?.code ?? 'error', body.error?.message ?? '', body.error as unknown as Record<string, unknown>);
    return body;
  };
  let serverMs = 0;
  const transport: Transport = {
    registerDevice: async (id, label) => void (await answer(await devices(req('/api/devices', { method: 'POST', body: { id, label } }), ctx))),
    push: async (body) => {
      const t = performance.now();
      const res = await answer<import('@/lib/sync/protocol').PushResponse>(await push(req('/api/sync/push', { method: 'POST', body }), ctx));
      serverMs += performance.now() - t;
      return res;
    },
    pull: async (cursor, limit, deviceId) => answer(await pull(req(`/api/sync/pull?cursor=${cursor}&limit=${limit}`, { headers: { 'x-device-id': deviceId } }), ctx)),
  };

  // The device queues 5,000 tallies (as the entry form would), then pushes them.
  const device = new MemoryStore(randomUUID(), coord.id);
  for (let k = 0; k < 5000; k++) {
    const values = { siteId: sites[k % 50]!, date: addDays(start, Math.floor(k / 50)), newCases: k % 17, recoveries: null, deaths: null, admissions: null, note: null };
    await queueChange(device, { entity: 'tally', op: 'upsert', record: { id: randomUUID(), version: 0, changeSeq: 0, deletedAt: null, outbreakId, ...values }, payload: values, userId: coord.id });
  }
  await transport.registerDevice((await device.meta()).deviceId, 'Bench tablet');
  await device.tx((tx) => tx.setMeta({ registeredFor: coord.id }));
  const t0 = performance.now();
  const report = await syncOnce(device, transport, { pushOnly: true, batchSize: 500 });
  const pushMs = performance.now() - t0;
  const pushServerMs = serverMs;
  if (!report.ok || report.pushed.applied !== 5000) throw new Error(`push did not apply 5,000: ${JSON.stringify(report.pushed)} ${report.message ?? ''}`);
  const onServer = await Tally.count({ where: { outbreakId } });
  const recorded = await AppliedMutation.count({ where: { deviceId: (await device.meta()).deviceId } });
  if (onServer !== 5000 || recorded !== 5000 || (await device.outboxCount()) !== 0) throw new Error(`applied-once check failed: ${onServer} tallies, ${recorded} recorded`);
  const again = await syncOnce(device, transport, { pushOnly: true });
  if (!again.ok) throw new Error('second push failed');

  // 45,000 more changes (bulk, as an import would), so a new device has 50,000+ to pull.
  const N = 45_000;
  await writeTx(async (t) => {
    const first = await nextChangeSeq(t);
    await ServerCounter.increment('value', { by: N - 1, where: { name: 'change' }, transaction: t });
    const now = new Date();
    for (let i = 0; i < N; i += 1000) {
      await Tally.bulkCreate(
        Array.from({ length: Math.min(1000, N - i) }, (_, j) => {
          const k = i + j;
          return {
            id: randomUUID(), outbreakId, siteId: sites[k % 50], date: addDays(start, -1 - Math.floor(k / 50)), newCases: k % 11,
            version: 1, changeSeq: first + k, updatedBy: coord.id, deviceId: null, recordedBy: coord.id, recordedAt: now, createdAt: now, updatedAt: now,
          };
        }),
        { transaction: t, validate: false, hooks: false },
      );
    }
  });
  const fresh = new MemoryStore(randomUUID(), coord.id);
  const t1 = performance.now();
  const pulled = await syncOnce(fresh, transport, { pullLimit: 2000 });
  const pullMs = performance.now() - t1;
  if (!pulled.ok) throw new Error(`pull failed: ${pulled.message}`);
  const got = fresh.live('tally').filter((r) => r.outbreakId === outbreakId).length;
  if (got !== 50_000) throw new Error(`pulled ${got} of the bench outbreak's 50,000 tallies`);
  await closeDb();
  return [
    { name: 'sync: push 5,000 queued tallies end to end (10 × 500)', value: pushMs, unit: 'ms', target: '≤ 3000 ms, applied once' },
    { name: 'sync: push throughput', value: 5000 / (pushMs / 1000), unit: 'muts/s' },
    { name: 'sync: push, of which route handler + database', value: pushServerMs, unit: 'ms' },
    { name: `sync: pull ${pulled.pulled.toLocaleString('en')} changes into a new device (pages of 2,000)`, value: pullMs, unit: 'ms' },
    { name: 'sync: pull throughput', value: pulled.pulled / (pullMs / 1000), unit: 'chg/s' },
  ];
}
