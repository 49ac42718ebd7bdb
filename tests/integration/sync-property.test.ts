/**
 * Property test of the whole sync loop (SYNC.md, "What tests must show"): random schedules of three
 * devices (a field officer of the North team, the coordinator, a field officer of the Lakeshore
 * team) going offline and online, creating, editing and deleting tallies of shared and separate
 * sites, with lost requests, lost responses, duplicated deliveries, delayed (late, reordered)
 * deliveries and pipelined batches that reach the server out of order. The devices run the real
 * client engine (lib/sync/engine.ts) on in-memory stores; the server is the real push/pull code on
 * a real SQLite file. After everyone syncs: every device and the server hold the same tallies, no
 * mutation is lost or applied twice, and every disagreement is a conflict row.
 *
 * Each schedule gets an outbreak of its own (teams, sites, memberships), so runs do not see each
 * other and one database serves them all.
 */
import { prepare } from '../helpers/server';
import { randomUUID } from 'node:crypto';
import { existsSync, mkdtempSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { Op } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Actor } from '@/lib/auth/actor';
import { queueChange, syncOnce, SyncHttpError, type LocalRecord, type Transport } from '@/lib/sync/engine';
import { MemoryStore } from '@/lib/sync/memory-store';
import type { Mutation } from '@/lib/sync/protocol';
import { addDays, utcToday } from '@/lib/tallies/dates';

const RUNS = Number(process.env.SYNC_PROPERTY_RUNS || 1000);
/** Schedules run side by side per property run (each in its own outbreak): the server sees them interleaved. */
const PARALLEL = 4;

// The same real SQLite file (WAL, synchronous=FULL), placed in memory-backed /dev/shm when there
// is one: a schedule commits about twenty transactions, and a disk's fsync would make a thousand
// schedules take many minutes without exercising anything more.
if (existsSync('/dev/shm')) process.env.DATABASE_URL = `file:${path.join(mkdtempSync('/dev/shm/ebbcast-prop-'), 'prop.sqlite')}`;

type Fault = 'ok' | 'lose_request' | 'lose_response' | 'duplicate' | 'delay' | 'reorder';
type Step =
  | { kind: 'write'; device: number; site: number; day: number; cases: number; del: boolean }
  | { kind: 'sync'; device: number; faults: Fault[] }
  | { kind: 'net'; device: number; online: boolean }
  | { kind: 'deliver' };

const faultArb = fc.constantFrom<Fault>('ok', 'ok', 'ok', 'lose_request', 'lose_response', 'duplicate', 'delay', 'reorder', 'reorder');
const stepArb: fc.Arbitrary<Step> = fc.oneof(
  { weight: 7, arbitrary: fc.record({ kind: fc.constant('write' as const), device: fc.nat(2), site: fc.nat(2), day: fc.nat(2), cases: fc.nat(6), del: fc.nat(3).map((n) => n === 0) }) },
  { weight: 3, arbitrary: fc.record({ kind: fc.constant('sync' as const), device: fc.nat(2), faults: fc.array(faultArb, { maxLength: 4 }) }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('net' as const), device: fc.nat(2), online: fc.boolean() }) },
  { weight: 1, arbitrary: fc.constant({ kind: 'deliver' as const }) },
);

interface Totals { schedules: number; mutations: number; conflicts: number; duplicates: number; rejected: number; faults: Record<Fault, number>; gaps: number }
const totals: Totals = { schedules: 0, mutations: 0, conflicts: 0, duplicates: 0, rejected: 0, faults: { ok: 0, lose_request: 0, lose_response: 0, duplicate: 0, delay: 0, reorder: 0 }, gaps: 0 };

let mods: {
  sync: typeof import('@/lib/db/sync');
  models: typeof import('@/models');
  conn: typeof import('@/lib/db/connection');
  counters: typeof import('@/lib/db/counters');
  usersDb: typeof import('@/lib/db/users');
};

beforeAll(async () => {
  await prepare();
  mods = {
    sync: await import('@/lib/db/sync'),
    models: await import('@/models'),
    conn: await import('@/lib/db/connection'),
    counters: await import('@/lib/db/counters'),
    usersDb: await import('@/lib/db/users'),
  };
  if (process.env.SYNC_PROPERTY_COUNT_QUERIES) {
    const seqz = await mods.conn.db();
    const counts = new Map<string, number>();
    (seqz as unknown as { options: { logging: unknown } }).options.logging = (sql: string) => {
      const k = sql.replace(/^Executing \([^)]*\): /, '').slice(0, 40);
      counts.set(k, (counts.get(k) ?? 0) + 1);
    };
    process.on('beforeExit', () => console.log([...counts.entries()].sort((a, b) => b[1] - a[1]).slice(0, 25)));
    (globalThis as { __qc?: Map<string, number> }).__qc = counts;
  }
  const { User } = mods.models;
  const actor = async (email: string) => {
    const u = (await User.findOne({ where: { email } }))!;
    return (await mods.usersDb.loadActor(u.id, u.sessionVersion))!;
  };
  baseActors = [await actor('field@marrowbend.example'), await actor('coordinator@marrowbend.example'), await actor('field2@marrowbend.example')];
  await makeWorlds(RUNS + PARALLEL);
});

interface World {
  outbreakId: string;
  /** Sites: 0 North shared (A, B), 1 Lakeshore shared (B, C), 2 North for A alone, 3 Lakeshore for C alone. */
  sites: string[];
  startDate: string;
  actors: Actor[];
  cleanup: () => Promise<void>;
}

/** Which sites each device writes: index into World.sites per generated site number 0..2. */
const DEVICE_SITES = [[0, 2, 0], [0, 1, 1], [1, 3, 3]];
/** Which sites each device may read (its pull scope). */
const DEVICE_SCOPE = [[0, 2], [0, 1, 2, 3], [1, 3]];

let baseActors: Actor[] = [];
const worlds: World[] = [];

/**
 * Makes `n` worlds in a few bulk transactions: an outbreak each with a North and a Lakeshore team
 * and four sites. The three actors of a world are the demo users with their scope narrowed to that
 * world (outbreak and team), as the permission checks and pull read it from the actor.
 */
async function makeWorlds(n: number): Promise<void> {
  const { Outbreak, Team, Site, ServerCounter } = mods.models;
  const startDate = addDays(utcToday(), -10);
  for (let from = 0; from < n; from += 250) {
    const count = Math.min(250, n - from);
    await mods.conn.writeTx(async (t) => {
      const first = await mods.counters.nextChangeSeq(t);
      await ServerCounter.increment('value', { by: count * 7, where: { name: 'change' }, transaction: t });
      let seq = first;
      const now = new Date();
      const stamp = () => ({ version: 1, changeSeq: seq++, updatedBy: null, deviceId: null, createdAt: now, updatedAt: now });
      const outbreaks: Record<string, unknown>[] = [], teams: Record<string, unknown>[] = [], sites: Record<string, unknown>[] = [];
      for (let k = 0; k < count; k++) {
        const outbreakId = randomUUID(), teamN = randomUUID(), teamL = randomUUID();
        const ids = [randomUUID(), randomUUID(), randomUUID(), randomUUID()];
        outbreaks.push({ id: outbreakId, name: `Run ${from + k}`, disease: 'ILI', area: 'Test', population: 5000, startDate, beds: null, ...stamp() });
        teams.push({ id: teamN, outbreakId, name: 'N', ...stamp() }, { id: teamL, outbreakId, name: 'L', ...stamp() });
        const teamOf = [teamN, teamL, teamN, teamL];
        ids.forEach((id, i) => sites.push({ id, outbreakId, teamId: teamOf[i], name: `S${i}`, kind: 'camp', population: 500, ...stamp() }));
        const [field, coordinator, field2] = baseActors as [Actor, Actor, Actor];
        worlds.push({
          outbreakId, sites: ids, startDate,
          actors: [
            { ...field, outbreakIds: [outbreakId], teamIds: [teamN] },
            { ...coordinator, outbreakIds: [outbreakId], teamIds: [] },
            { ...field2, outbreakIds: [outbreakId], teamIds: [teamL] },
          ],
          cleanup: async () => undefined,
        });
      }
      await Outbreak.bulkCreate(outbreaks, { transaction: t });
      await Team.bulkCreate(teams, { transaction: t });
      await Site.bulkCreate(sites, { transaction: t });
    });
  }
}

async function makeWorld(): Promise<World> {
  if (!worlds.length) await makeWorlds(PARALLEL * 10);
  return worlds.pop()!;
}

class Net {
  held: (() => Promise<unknown>)[] = [];
  online = true;
  faults: Fault[] = [];
  /** Calls held back by a 'reorder' fault until another call of this device has reached the server. */
  waiting: (() => void)[] = [];
  reached(): void {
    for (const w of this.waiting.splice(0)) w();
  }
  async deliverHeld(): Promise<void> {
    const h = this.held.splice(0);
    // Late deliveries arrive in reverse order: the most reordered case.
    for (const f of h.reverse()) await f().catch(() => undefined);
  }
}

function transport(actor: Actor, net: Net): Transport {
  const { registerDevice, pushMutations, pullChanges } = mods.sync;
  const gate = async <T>(fn: () => Promise<T>): Promise<T> => {
    if (!net.online) throw new SyncHttpError(0, 'offline', 'offline');
    const fault: Fault = net.faults.shift() ?? 'ok';
    totals.faults[fault]++;
    const wrap = async () => {
      try {
        return await fn();
      } catch (err) {
        const e = err as { status?: number; code?: string; message?: string; detail?: Record<string, unknown> };
        if (typeof e.status === 'number' && e.status < 500) throw new SyncHttpError(e.status, e.code ?? 'error', e.message ?? '', e.detail);
        throw err;
      } finally {
        net.reached();
      }
    };
    switch (fault) {
      case 'lose_request':
        throw new SyncHttpError(0, 'timeout', 'request lost');
      case 'lose_response':
        await wrap().catch(() => undefined);
        throw new SyncHttpError(0, 'timeout', 'response lost');
      case 'duplicate': {
        const [first] = await Promise.allSettled([wrap(), wrap()]);
        if (first.status === 'rejected') throw first.reason;
        return first.value;
      }
      case 'delay':
        net.held.push(wrap);
        throw new SyncHttpError(0, 'timeout', 'no answer yet');
      case 'reorder':
        // Let the other batch in flight (if any) reach the server first.
        await Promise.race([new Promise<void>((r) => net.waiting.push(r)), new Promise((r) => setTimeout(r, 30))]);
        return wrap();
      default:
        return wrap();
    }
  };
  return {
    registerDevice: (id, label) => registerDevice(actor, { id, label }).then(() => undefined),
    push: (body: { deviceId: string; mutations: Mutation[] }) =>
      gate(async () => {
        try {
          return await pushMutations(actor, body);
        } catch (err) {
          if ((err as { detail?: { reason?: string } }).detail?.reason === 'seq_gap') totals.gaps++;
          throw err;
        }
      }),
    pull: (cursor, limit) => gate(() => pullChanges(actor, { cursor, limit })),
  };
}

interface Device { store: MemoryStore; net: Net; tr: Transport; queued: string[] }

async function write(d: Device, w: World, deviceIndex: number, s: Extract<Step, { kind: 'write' }>) {
  const siteId = w.sites[DEVICE_SITES[deviceIndex]![s.site]!]!;
  const date = addDays(w.startDate, s.day);
  const existing = d.store.live('tally').find((r) => r.siteId === siteId && r.date === date);
  if (s.del && !existing) return;
  const values = { siteId, date, newCases: s.cases, recoveries: null, deaths: null, admissions: null, note: null };
  const record: LocalRecord = existing
    ? { ...existing, ...values }
    : { id: randomUUID(), version: 0, changeSeq: 0, deletedAt: null, outbreakId: w.outbreakId, ...values, recordedBy: null, recordedAt: null };
  const e = await queueChange(d.store, { entity: 'tally', op: s.del ? 'delete' : 'upsert', record, payload: s.del ? null : values, userId: null });
  d.queued.push(e.mutationId);
}

const valuesOf = (r: Record<string, unknown>) => ({ id: r.id, siteId: r.siteId, date: r.date, newCases: r.newCases, version: r.version });

const phase: Record<string, number> = {};
const timed = async <T>(name: string, fn: () => Promise<T>): Promise<T> => {
  const t0 = performance.now();
  try {
    return await fn();
  } finally {
    phase[name] = (phase[name] ?? 0) + performance.now() - t0;
  }
};

async function runSchedule(steps: Step[], pipeline: number, batchSize: number): Promise<void> {
  const w = await timed('world', makeWorld);
  try {
    const devices: Device[] = w.actors.map((actor, i) => {
      const store = new MemoryStore(randomUUID(), actor.id);
      const net = new Net();
      return { store, net, tr: transport(actor, net), queued: [] as string[] };
    });
    for (const s of steps) {
      if (s.kind === 'write') await write(devices[s.device]!, w, s.device, s);
      else if (s.kind === 'net') devices[s.device]!.net.online = s.online;
      else if (s.kind === 'deliver') for (const d of devices) await d.net.deliverHeld();
      else {
        const d = devices[s.device]!;
        d.net.faults = [...s.faults];
        await timed('sync', () => syncOnce(d.store, d.tr, { batchSize, pipeline, deviceLabel: `dev${s.device}` }));
        d.net.faults = [];
      }
    }
    // Everyone back online; late deliveries arrive; then everyone syncs until nothing moves.
    for (const d of devices) {
      d.net.online = true;
      await d.net.deliverHeld();
    }
    // Everyone pushes what is left, then everyone syncs (pull) once more.
    for (const pushOnly of [true, false]) {
      for (const d of devices) {
        const r = await timed('final', () => syncOnce(d.store, d.tr, { batchSize, pipeline: 1, deviceLabel: 'final', pushOnly }));
        expect(r.ok, r.message).toBe(true);
      }
    }
    await timed('check', () => check(w, devices));
  } finally {
    await timed('cleanup', w.cleanup);
  }
}

async function check(w: World, devices: Device[]) {
  const { Tally, AppliedMutation, Conflict } = mods.models;
  const server = await Tally.findAll({ where: { outbreakId: w.outbreakId } });
  const live = server.filter((t) => !t.deletedAt);
  // At most one live tally per site and day on the server.
  expect(new Set(live.map((t) => `${t.siteId}|${t.date}`)).size).toBe(live.length);
  for (const [i, d] of devices.entries()) {
    expect(await d.store.outboxCount()).toBe(0);
    const scope = new Set(DEVICE_SCOPE[i]!.map((k) => w.sites[k]!));
    const want = live.filter((t) => scope.has(t.siteId)).map((t) => valuesOf(t.get({ plain: true }))).sort((a, b) => String(a.id).localeCompare(String(b.id)));
    const have = d.store.live('tally').map(valuesOf).sort((a, b) => String(a.id).localeCompare(String(b.id)));
    expect(have).toEqual(want);
  }
  const all = devices.flatMap((d) => d.queued);
  const recorded = await AppliedMutation.findAll({ where: { mutationId: { [Op.in]: all } } });
  // Zero lost: every queued mutation is recorded, each exactly once (primary key).
  expect(recorded.length).toBe(all.length);
  // Zero applied twice: each tally's version counts exactly the mutations applied to it.
  const applied = new Map<string, number>();
  for (const r of recorded) if (r.fate === 'applied') applied.set(r.entityId, (applied.get(r.entityId) ?? 0) + 1);
  for (const t of server) expect(Number(t.version)).toBe(applied.get(t.id) ?? 0);
  // Every disagreement is a conflict row carrying the incoming change.
  const conflicts = await Conflict.findAll({ where: { outbreakId: w.outbreakId } });
  const byMutation = new Map(conflicts.map((c) => [c.mutationId, c]));
  for (const r of recorded) {
    if (r.fate === 'conflict') {
      const c = byMutation.get(r.mutationId);
      expect(c, `conflict row for ${r.mutationId}`).toBeTruthy();
      expect(JSON.parse(c!.incoming).id ?? r.entityId).toBe(r.entityId);
    }
    if (r.fate === 'rejected') expect(['not_found']).toContain(r.reason);
  }
  expect(conflicts.length).toBe(recorded.filter((r) => r.fate === 'conflict').length);
  totals.schedules++;
  totals.mutations += all.length;
  totals.conflicts += conflicts.length;
  totals.duplicates += recorded.filter((r) => r.fate === 'duplicate').length;
  totals.rejected += recorded.filter((r) => r.fate === 'rejected').length;
}

describe('sync under random schedules', () => {
  it(`converges for ${RUNS} schedules of 3 devices with faults: same data everywhere, nothing lost or applied twice, every disagreement a conflict`, async () => {
    const started = Date.now();
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.tuple(fc.array(stepArb, { minLength: 4, maxLength: 16 }), fc.constantFrom(1, 2, 2), fc.constantFrom(1, 2, 500)), { minLength: PARALLEL, maxLength: PARALLEL }),
        async (schedules) => {
          await Promise.all(schedules.map(([steps, pipeline, batchSize]) => runSchedule(steps, pipeline, batchSize)));
        },
      ),
      { numRuns: Math.ceil(RUNS / PARALLEL), seed: Number(process.env.SYNC_PROPERTY_SEED || 20260314), endOnFailure: true },
    );
    const qc = (globalThis as { __qc?: Map<string, number> }).__qc;
    if (qc) console.log([...qc.entries()].sort((a, b) => b[1] - a[1]).slice(0, 30));
    if (process.env.SYNC_PROPERTY_COUNT_QUERIES) console.log(phase);
    console.log(`[sync property] ${totals.schedules} schedules, ${totals.mutations} mutations, ${totals.conflicts} conflict rows, ${totals.duplicates} duplicates, ${totals.rejected} rejected, ${totals.gaps} seq gaps refused; faults ${JSON.stringify(totals.faults)}; ${((Date.now() - started) / 1000).toFixed(1)} s`);
    expect(totals.schedules).toBeGreaterThanOrEqual(RUNS);
    expect(totals.conflicts).toBeGreaterThan(0);
    expect(totals.gaps).toBeGreaterThan(0);
  }, 1_800_000);
});
