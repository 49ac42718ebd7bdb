/**
 * The sync protocol against a real SQLite file through the real route handlers (SYNC.md):
 * idempotent push, the seq rule, device ownership, scope rejections, conflicts, pull paging and
 * tombstones, the merge desk's settlement race, and the ledger's chain.
 */
import { call, prepare, sessionCookie } from '../helpers/server';
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS, demoStartDate } from '@/lib/db/demo';
import { addDays } from '@/lib/tallies/dates';

type H = Parameters<typeof call>[0];
let push: H, pull: H, devices: H, conflicts: H, settle: H, ledger: H, ledgerExport: H, verify: H;
let field: string, field2: string, coordinator: string, supervisor: string;
const start = demoStartDate();
/** Sites of this test (the demo's own sites already carry tallies for every day). */
const S = { a: '', b: '', c: '', lake: '' };
const day = (n: number) => addDays(start, n);

const mutation = (seq: number, over: Record<string, unknown> = {}) => ({
  mutationId: randomUUID(), seq, entity: 'tally', entityId: randomUUID(), op: 'upsert', baseVersion: null,
  payload: { siteId: S.a, date: day(1), newCases: 3 }, recordedAt: new Date().toISOString(), ...over,
});

async function register(cookie: string, id = randomUUID(), label = 'Tablet') {
  const r = await call(devices, '/api/devices', { method: 'POST', cookie, body: { id, label } });
  expect(r.status).toBe(200);
  return id;
}
const doPush = (cookie: string, deviceId: string, mutations: unknown[]) => call(push, '/api/sync/push', { method: 'POST', cookie, body: { deviceId, mutations } });

beforeAll(async () => {
  await prepare();
  push = (await import('@/app/api/sync/push/route')).POST as H;
  pull = (await import('@/app/api/sync/pull/route')).GET as H;
  devices = (await import('@/app/api/devices/route')).POST as H;
  conflicts = (await import('@/app/api/conflicts/route')).GET as H;
  settle = (await import('@/app/api/conflicts/[id]/settle/route')).POST as H;
  ledger = (await import('@/app/api/ledger/route')).GET as H;
  ledgerExport = (await import('@/app/api/ledger/export/route')).GET as H;
  verify = (await import('@/app/api/ledger/verify/route')).GET as H;
  const { createSite } = await import('@/lib/db/outbreaks');
  const { loadActor } = await import('@/lib/db/users');
  const { User } = await import('@/models');
  const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
  const coord = (await loadActor(u.id, u.sessionVersion))!;
  const site = async (name: string, teamId: string) => (await createSite(coord, { outbreakId: DEMO_IDS.outbreak, name, kind: 'camp', population: 500, teamId })).id;
  S.a = await site('Sync test A', DEMO_IDS.teamNorth);
  S.b = await site('Sync test B', DEMO_IDS.teamNorth);
  S.c = await site('Sync test C', DEMO_IDS.teamNorth);
  S.lake = await site('Sync test Lake', DEMO_IDS.teamLakeshore);
  [field, field2, coordinator, supervisor] = (await Promise.all(['field', 'field2', 'coordinator', 'supervisor'].map((u) => sessionCookie(`${u}@marrowbend.example`)))) as [string, string, string, string];
});

describe('push', () => {
  it('applies a new tally once; a response lost and the batch resent 5 times changes nothing and gets the same answer', async () => {
    const { Tally, AppliedMutation, LedgerEntry } = await import('@/models');
    const dev = await register(field);
    const m = mutation(1, { payload: { siteId: S.b, date: day(2), newCases: 7 } });
    const pushesBefore = await LedgerEntry.count({ where: { kind: 'push', deviceId: dev } });
    const first = await doPush(field, dev, [m]);
    expect(first.status).toBe(200);
    expect(first.body.results[0].fate).toBe('applied');
    expect(first.body.results[0].record.version).toBe(1);
    expect(first.body.highestSeq).toBe(1);
    for (let i = 0; i < 5; i++) {
      const again = await doPush(field, dev, [m]);
      expect(again.status).toBe(200);
      expect(again.body).toEqual(first.body);
    }
    const rows = await Tally.findAll({ where: { id: m.entityId } });
    expect(rows).toHaveLength(1);
    expect(rows[0]!.version).toBe(1); // applied once: no second version
    expect(await AppliedMutation.count({ where: { mutationId: m.mutationId } })).toBe(1);
    // One ledger row per push (6 pushes), each in the push's transaction.
    expect(await LedgerEntry.count({ where: { kind: 'push', deviceId: dev } })).toBe(pushesBefore + 6);
  });

  it('refuses a gap in seq with 409 naming the expected seq, and records nothing of that batch', async () => {
    const { Tally } = await import('@/models');
    const dev = await register(field);
    const a = mutation(1, { payload: { siteId: S.a, date: day(3), newCases: 1 } });
    const c = mutation(3, { payload: { siteId: S.a, date: day(4), newCases: 1 } });
    expect((await doPush(field, dev, [a])).status).toBe(200);
    const gap = await doPush(field, dev, [c]);
    expect(gap.status).toBe(409);
    expect(gap.body.error.reason).toBe('seq_gap');
    expect(gap.body.error.expectedSeq).toBe(2);
    expect(await Tally.count({ where: { id: c.entityId } })).toBe(0);
    // Seqs inside one batch must be consecutive.
    const bad = await doPush(field, dev, [mutation(2), mutation(4)]);
    expect(bad.status).toBe(400);
  });

  it('refuses a device of another user (403) and an unknown device (404), and a signed-out push (401)', async () => {
    const dev = await register(field);
    const other = await doPush(field2, dev, [mutation(1)]);
    expect(other.status).toBe(403);
    const reg = await call(devices, '/api/devices', { method: 'POST', cookie: field2, body: { id: dev, label: 'Mine now' } });
    expect(reg.status).toBe(403);
    const unknown = await doPush(field, randomUUID(), [mutation(1)]);
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.reason).toBe('device_unknown');
    const anon = await call(push, '/api/sync/push', { method: 'POST', body: { deviceId: dev, mutations: [] } });
    expect(anon.status).toBe(401);
  });

  it('rejects a mutation outside the user\'s scope on its own, with a reason, and applies the rest', async () => {
    const { Tally } = await import('@/models');
    const dev = await register(field);
    const mine = mutation(1, { payload: { siteId: S.c, date: day(5), newCases: 2 } });
    const theirs = mutation(2, { payload: { siteId: S.lake, date: day(5), newCases: 9 } }); // Lakeshore team's site
    const unknownEntity = mutation(3, { entity: 'gizmo' });
    const invalid = mutation(4, { payload: { siteId: S.c, date: day(6), newCases: -1 } });
    const mine2 = mutation(5, { payload: { siteId: S.c, date: day(7), newCases: 4 } });
    const r = await doPush(field, dev, [mine, theirs, unknownEntity, invalid, mine2]);
    expect(r.status).toBe(200);
    expect(r.body.results.map((x: { fate: string }) => x.fate)).toEqual(['applied', 'rejected', 'rejected', 'rejected', 'applied']);
    expect(r.body.results[1].reason).toBe('forbidden');
    expect(r.body.results[2].reason).toBe('entity_not_supported');
    expect(r.body.results[3].reason).toBe('validation_failed');
    expect(r.body.highestSeq).toBe(5);
    expect(await Tally.count({ where: { id: theirs.entityId } })).toBe(0);
    expect(await Tally.count({ where: { id: [mine.entityId, mine2.entityId] } })).toBe(2);
  });

  it('turns two creates of one site and day with different counts into a conflict row; equal counts are a duplicate', async () => {
    const { Conflict, Tally } = await import('@/models');
    const a = await register(field);
    const b = await register(coordinator);
    const mA = mutation(1, { payload: { siteId: S.a, date: day(8), newCases: 5 } });
    const mB = mutation(1, { payload: { siteId: S.a, date: day(8), newCases: 6 } });
    const mB2 = mutation(2, { payload: { siteId: S.a, date: day(8), newCases: 5 } });
    expect((await doPush(field, a, [mA])).body.results[0].fate).toBe('applied');
    const rb = await doPush(coordinator, b, [mB, mB2]);
    expect(rb.body.results[0].fate).toBe('conflict');
    expect(rb.body.results[0].reason).toBe('duplicate_day');
    expect(rb.body.results[0].record.id).toBe(mA.entityId); // the value that stayed
    expect(rb.body.results[1].fate).toBe('duplicate');
    const c = await Conflict.findByPk(rb.body.results[0].conflictId);
    expect(c?.entityId).toBe(mA.entityId);
    expect(JSON.parse(c!.incoming).newCases).toBe(6);
    expect(await Tally.count({ where: { siteId: S.a, date: day(8), deletedAt: null } })).toBe(1);
  });

  it('makes a delete on one device against an offline edit on another a conflict, not a resurrection', async () => {
    const { Conflict, Tally } = await import('@/models');
    const a = await register(field);
    const b = await register(coordinator);
    const create = mutation(1, { payload: { siteId: S.b, date: day(9), newCases: 4 } });
    expect((await doPush(field, a, [create])).body.results[0].fate).toBe('applied');
    // A deletes it (based on version 1); B, offline, had edited version 1.
    const del = mutation(2, { entityId: create.entityId, op: 'delete', baseVersion: 1, payload: null });
    expect((await doPush(field, a, [del])).body.results[0].fate).toBe('applied');
    const edit = mutation(1, { entityId: create.entityId, baseVersion: 1, payload: { siteId: S.b, date: day(9), newCases: 8 } });
    const r = await doPush(coordinator, b, [edit]);
    expect(r.body.results[0].fate).toBe('conflict');
    expect(r.body.results[0].reason).toBe('edit_deleted');
    const t = await Tally.findByPk(create.entityId);
    expect(t?.deletedAt).not.toBeNull(); // still deleted
    expect(await Conflict.count({ where: { entityId: create.entityId, status: 'open' } })).toBe(1);
  });
});

describe('scenarios', () => {
  it('syncs a scenario through the scenario functions: create, two offline edits of the same device, delete; another device\'s stale edit is refused alone', async () => {
    const { Scenario } = await import('@/models');
    const dev = await register(field);
    const id = randomUUID();
    const input = { model: 'SIR', population: 12660, initial: { I: 3 }, params: { beta: 0.5, gamma: 0.25 }, method: 'rk4', step: 0.25, days: 120 };
    const sc = (seq: number, over: Record<string, unknown> = {}) =>
      mutation(seq, { entity: 'scenario', entityId: id, payload: { outbreakId: DEMO_IDS.outbreak, name: 'Camp closure', input, notes: null }, ...over });
    const r = await doPush(field, dev, [
      sc(1),
      sc(2, { payload: { outbreakId: DEMO_IDS.outbreak, name: 'Camp closure, edited', input, notes: null } }),
      sc(3, { baseVersion: 1, payload: { outbreakId: DEMO_IDS.outbreak, name: 'Camp closure, edited twice', input, notes: null } }),
    ]);
    expect(r.body.results.map((x: { fate: string }) => x.fate)).toEqual(['applied', 'applied', 'applied']);
    expect((await Scenario.findByPk(id))!.version).toBe(3); // the device's own edits chain on its last write
    const other = await register(coordinator);
    const stale = await doPush(coordinator, other, [sc(1, { baseVersion: 1, payload: { outbreakId: DEMO_IDS.outbreak, name: 'Coordinator edit', input, notes: null } })]);
    expect(stale.body.results[0].fate).toBe('rejected');
    expect(stale.body.results[0].reason).toBe('stale_version');
    expect(stale.body.results[0].record.name).toBe('Camp closure, edited twice'); // the device can put the server copy back
    const del = await doPush(field, dev, [sc(4, { op: 'delete', payload: null, baseVersion: 3 })]);
    expect(del.body.results[0].fate).toBe('applied');
    expect((await Scenario.findByPk(id))!.deletedAt).not.toBeNull();
    const again = await doPush(coordinator, other, [sc(2, { op: 'delete', payload: null, baseVersion: 4 })]);
    expect(again.body.results[0].fate).toBe('duplicate'); // already deleted: agreement
  });
});

describe('bulk path', () => {
  it('writes the same record for plain new tallies in bulk as upsertTally writes for one', async () => {
    const { Tally } = await import('@/models');
    const dev = await register(field);
    const recordedAt = '2026-01-02T03:04:05.000Z';
    const slow = mutation(1, { recordedAt, payload: { siteId: S.c, date: day(10), newCases: 5, recoveries: 1, note: '  seen at the gate ' } });
    const bulk = [2, 3, 4].map((seq, i) => mutation(seq, { recordedAt, payload: { siteId: S.c, date: day(11 + i), newCases: 5, recoveries: 1, note: '  seen at the gate ' } }));
    const one = await doPush(field, dev, [slow]); // a batch of one goes through upsertTally
    const many = await doPush(field, dev, bulk);
    expect(one.body.results[0].fate).toBe('applied');
    expect(many.body.results.map((r: { fate: string }) => r.fate)).toEqual(['applied', 'applied', 'applied']);
    const strip = (r: Record<string, unknown>) => {
      const { id: _i, date: _d, changeSeq: _c, createdAt: _a, updatedAt: _u, ...rest } = r;
      return rest;
    };
    const a = (await Tally.findByPk(slow.entityId))!.get({ plain: true });
    for (const m of bulk) {
      const b = (await Tally.findByPk(m.entityId))!.get({ plain: true });
      expect(strip(b)).toEqual(strip(a));
    }
    expect(strip(many.body.results[0].record)).toEqual(strip(one.body.results[0].record));
    expect(one.body.results[0].record.note).toBe('seen at the gate');
    expect(one.body.results[0].record.deviceId).toBe(dev);
    expect(one.body.results[0].record.recordedAt).toBe(recordedAt);
  });
});

describe('pull', () => {
  it('pages every visible change in changeSeq order with tombstones; a field officer sees only their team\'s sites', async () => {
    const seen: { entity: string; record: { id: string; changeSeq: number; deletedAt: string | null; siteId?: string } }[] = [];
    let cursor = 0;
    let pages = 0;
    for (;;) {
      const r = await call(pull, `/api/sync/pull?cursor=${cursor}&limit=3`, { cookie: field });
      expect(r.status).toBe(200);
      seen.push(...r.body.changes);
      cursor = r.body.cursor;
      pages++;
      if (!r.body.more) break;
    }
    expect(pages).toBeGreaterThan(2);
    const seqs = seen.map((c) => c.record.changeSeq);
    expect([...seqs].sort((x, y) => x - y)).toEqual(seqs); // server order
    expect(new Set(seqs).size).toBe(seqs.length); // no change twice across pages
    const entities = new Set(seen.map((c) => c.entity));
    for (const e of ['outbreak', 'team', 'site', 'tally']) expect(entities.has(e)).toBe(true);
    expect(seen.some((c) => c.entity === 'tally' && c.record.deletedAt !== null)).toBe(true); // the tombstone of the delete above
    const lakeshore = new Set<string>([DEMO_IDS.lakeshoreWard, DEMO_IDS.fennelVillage, S.lake]);
    expect(seen.filter((c) => c.entity === 'site' && lakeshore.has(c.record.id))).toHaveLength(0);
    expect(seen.filter((c) => c.entity === 'tally' && lakeshore.has(c.record.siteId ?? ''))).toHaveLength(0);
    // The coordinator sees the other team's sites.
    const all = await call(pull, '/api/sync/pull?cursor=0&limit=2000', { cookie: coordinator });
    expect(all.body.changes.filter((c: { entity: string; record: { id: string } }) => c.entity === 'site' && lakeshore.has(c.record.id))).toHaveLength(3);
    const done = await call(pull, `/api/sync/pull?cursor=${cursor}`, { cookie: field });
    expect(done.body.changes).toHaveLength(0);
    expect(done.body.cursor).toBe(cursor);
  });
});

describe('merge desk', () => {
  it('lets one of two coordinators settling at once win; the other gets 409 and nothing is overwritten', async () => {
    const { Tally, LedgerEntry } = await import('@/models');
    const list = await call(conflicts, `/api/conflicts?outbreak=${DEMO_IDS.outbreak}`, { cookie: coordinator });
    expect(list.status).toBe(200);
    const dup = list.body.conflicts.find((c: { reason: string }) => c.reason === 'duplicate_day');
    expect(dup).toBeTruthy();
    expect(dup.live.newCases).toBe(5);
    expect(dup.incoming.newCases).toBe(6);
    expect(dup.userName).toBe('Mira Haldane');
    const body = (settlement: string, extra: Record<string, unknown> = {}) => ({
      settlement, reason: 'Both teams counted the same ward', conflictVersion: dup.version, currentVersion: dup.live.version, ...extra,
    });
    const before = await LedgerEntry.count({ where: { kind: 'settlement' } });
    const [x, y] = await Promise.all([
      call(settle, `/api/conflicts/${dup.id}/settle`, { method: 'POST', cookie: coordinator, params: { id: dup.id }, body: body('sum') }),
      call(settle, `/api/conflicts/${dup.id}/settle`, { method: 'POST', cookie: coordinator, params: { id: dup.id }, body: body('corrected', { corrected: { newCases: 40 } }) }),
    ]);
    expect([x.status, y.status].sort()).toEqual([200, 409]);
    const winner = x.status === 200 ? x : y;
    const loser = x.status === 200 ? y : x;
    expect(loser.body.error.reason).toBe('already_settled');
    const t = await Tally.findByPk(dup.entityId);
    expect(t!.newCases).toBe(winner === x ? 11 : 40); // 5 + 6 [calc] or the typed 40
    expect(t!.version).toBe(dup.live.version + 1);
    expect(await LedgerEntry.count({ where: { kind: 'settlement' } })).toBe(before + 1);
    // A field officer may not settle.
    const f = await call(settle, `/api/conflicts/${dup.id}/settle`, { method: 'POST', cookie: field, params: { id: dup.id }, body: body('sum') });
    expect(f.status).toBe(403);
  });

  it('requires a reason and refuses a settlement against a tally that moved', async () => {
    const list = await call(conflicts, `/api/conflicts?outbreak=${DEMO_IDS.outbreak}`, { cookie: coordinator });
    const c = list.body.conflicts.find((x: { reason: string }) => x.reason === 'edit_deleted');
    const noReason = await call(settle, `/api/conflicts/${c.id}/settle`, { method: 'POST', cookie: coordinator, params: { id: c.id }, body: { settlement: 'keep_incoming', reason: '', conflictVersion: c.version, currentVersion: c.live.version } });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toBeTruthy();
    const moved = await call(settle, `/api/conflicts/${c.id}/settle`, { method: 'POST', cookie: coordinator, params: { id: c.id }, body: { settlement: 'keep_incoming', reason: 'restore', conflictVersion: c.version, currentVersion: c.live.version - 1 } });
    expect(moved.status).toBe(409);
    expect(moved.body.error.reason).toBe('version_moved');
    const ok = await call(settle, `/api/conflicts/${c.id}/settle`, { method: 'POST', cookie: coordinator, params: { id: c.id }, body: { settlement: 'keep_incoming', reason: 'The school reopened the count', conflictVersion: c.version, currentVersion: c.live.version } });
    expect(ok.status).toBe(200);
    expect(ok.body.tally.deletedAt).toBeNull(); // the incoming edit restored by a person, recorded
    expect(ok.body.tally.newCases).toBe(8);
  });
});

describe('ledger', () => {
  it('filters, exports CSV for supervisors only, and verifies its hash chain', async () => {
    const r = await call(ledger, `/api/ledger?kind=settlement`, { cookie: supervisor });
    expect(r.status).toBe(200);
    expect(r.body.rows.length).toBeGreaterThanOrEqual(2);
    expect(r.body.rows.every((x: { kind: string }) => x.kind === 'settlement')).toBe(true);
    const coordCsv = await call(ledgerExport, '/api/ledger/export', { cookie: coordinator });
    expect(coordCsv.status).toBe(403); // coordinators read, supervisors export
    const csv = await call(ledgerExport, '/api/ledger/export?kind=push', { cookie: supervisor });
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toContain('text/csv');
    const lines = String(csv.body).trim().split('\r\n');
    expect(lines[0]).toContain('applied,duplicate,conflict,rejected');
    expect(lines.length).toBeGreaterThan(5);
    const ok = await call(verify, '/api/ledger/verify', { cookie: supervisor });
    expect(ok.body.ok).toBe(true);
    // Tamper with one row behind the application's back: the check names it.
    const { LedgerEntry } = await import('@/models');
    const victim = (await LedgerEntry.findOne({ where: { kind: 'push' }, order: [['id', 'ASC']] }))!;
    await LedgerEntry.update({ counts: JSON.stringify({ applied: 999 }) }, { where: { id: victim.id } });
    const bad = await call(verify, '/api/ledger/verify', { cookie: supervisor });
    expect(bad.body.ok).toBe(false);
    expect(bad.body.firstBadId).toBe(victim.id);
    await LedgerEntry.update({ counts: victim.counts }, { where: { id: victim.id } });
    expect((await call(verify, '/api/ledger/verify', { cookie: supervisor })).body.ok).toBe(true);
  });
});
