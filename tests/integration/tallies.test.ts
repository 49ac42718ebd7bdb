/**
 * Tallies against a real SQLite file: writes and the conflict rules (lib/sync/tally-rules.ts),
 * tombstones, team scope through the real routes, the SQL epi curve against a hand-computed case,
 * pagination, filters and sorting.
 */
import { call, prepare, sessionCookie } from '../helpers/server';
import { beforeAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { DEMO_IDS } from '@/lib/db/demo';
import type { Actor } from '@/lib/auth/actor';
import { addDays, utcToday } from '@/lib/tallies/dates';

let field: Actor, field2: Actor, coordinator: Actor, supervisor: Actor;
let fieldCookie: string, field2Cookie: string, supervisorCookie: string, coordinatorCookie: string;
const DEV_A = 'device-a-0000000000000001';
const DEV_B = 'device-b-0000000000000002';
const today = utcToday();

async function actorOf(email: string): Promise<Actor> {
  const { User } = await import('@/models');
  const { loadActor } = await import('@/lib/db/users');
  const u = (await User.findOne({ where: { email } }))!;
  return (await loadActor(u.id, u.sessionVersion))!;
}

beforeAll(async () => {
  await prepare();
  [field, field2, coordinator, supervisor] = (await Promise.all(['field', 'field2', 'coordinator', 'supervisor'].map((u) => actorOf(`${u}@marrowbend.example`)))) as [Actor, Actor, Actor, Actor];
  [fieldCookie, field2Cookie, supervisorCookie, coordinatorCookie] = (await Promise.all(['field', 'field2', 'supervisor', 'coordinator'].map((u) => sessionCookie(`${u}@marrowbend.example`)))) as [string, string, string, string];
});

describe('writes and conflict rules', () => {
  it('creates, updates with baseVersion, and treats the same values as unchanged', async () => {
    const { upsertTally } = await import('@/lib/db/tallies');
    const id = randomUUID();
    const a = await upsertTally(field, { id, siteId: DEMO_IDS.alderCamp, date: today, newCases: 7, recoveries: 2 }, { deviceId: DEV_A });
    expect(a.status).toBe('applied');
    expect(a.tally).toMatchObject({ id, version: 1, newCases: 7, recoveries: 2, deaths: null, recordedBy: field.id, deviceId: DEV_A, outbreakId: DEMO_IDS.outbreak });
    const b = await upsertTally(field, { id, siteId: DEMO_IDS.alderCamp, date: today, newCases: 9, recoveries: 2, baseVersion: 1 }, { deviceId: null });
    expect(b.status).toBe('applied');
    expect(b.tally.version).toBe(2);
    expect(b.tally.newCases).toBe(9);
    expect(b.tally.changeSeq).toBeGreaterThan(a.tally.changeSeq);
    const c = await upsertTally(field, { id, siteId: DEMO_IDS.alderCamp, date: today, newCases: 9, recoveries: 2, baseVersion: 1 }, { deviceId: DEV_B });
    expect(c.status).toBe('unchanged');
    expect(c.tally.version).toBe(2);
  });

  it('keeps the current value and stores a duplicate_day conflict when another device creates the same site and day', async () => {
    const { upsertTally } = await import('@/lib/db/tallies');
    const { Conflict, Tally } = await import('@/models');
    const date = addDays(today, -1);
    // Hollin Crossing has no demo tally yesterday (a gap left on purpose).
    const first = await upsertTally(field, { id: randomUUID(), siteId: DEMO_IDS.hollinCrossing, date, newCases: 4 }, { deviceId: DEV_A });
    expect(first.status).toBe('applied');
    const same = await upsertTally(field, { id: randomUUID(), siteId: DEMO_IDS.hollinCrossing, date, newCases: 4 }, { deviceId: DEV_B });
    expect(same.status).toBe('unchanged');
    const before = await Conflict.count();
    const recordedAt = new Date('2026-01-02T10:00:00Z');
    const mutationId = randomUUID();
    const other = await upsertTally(field, { id: randomUUID(), siteId: DEMO_IDS.hollinCrossing, date, newCases: 6, note: 'second count' }, { deviceId: DEV_B, mutationId, recordedAt });
    expect(other.status).toBe('conflict');
    expect(other.tally.id).toBe(first.tally.id);
    expect(other.tally.newCases).toBe(4);
    expect(other.conflict).toMatchObject({ reason: 'duplicate_day', entity: 'tally', entityId: first.tally.id, deviceId: DEV_B, userId: field.id, status: 'open', recordedAt: recordedAt.toISOString() });
    expect(other.conflict!.incoming).toMatchObject({ newCases: 6, note: 'second count', siteId: DEMO_IDS.hollinCrossing, date });
    expect(other.conflict!.current).toMatchObject({ id: first.tally.id, newCases: 4 });
    expect(await Conflict.count()).toBe(before + 1);
    expect(await Tally.count({ where: { siteId: DEMO_IDS.hollinCrossing, date, deletedAt: null } })).toBe(1);
  });

  it('turns an edit of an older version into a stale_version conflict, except after the same device’s own write', async () => {
    const { upsertTally } = await import('@/lib/db/tallies');
    const id = randomUUID();
    await upsertTally(field2, { id, siteId: DEMO_IDS.lakeshoreWard, date: today, newCases: 3 }, { deviceId: DEV_A });
    const v2 = await upsertTally(field2, { id, siteId: DEMO_IDS.lakeshoreWard, date: today, newCases: 5, baseVersion: 1 }, { deviceId: DEV_A });
    expect(v2.tally.version).toBe(2);
    const stale = await upsertTally(field2, { id, siteId: DEMO_IDS.lakeshoreWard, date: today, newCases: 8, baseVersion: 1 }, { deviceId: DEV_B });
    expect(stale.status).toBe('conflict');
    expect(stale.conflict).toMatchObject({ reason: 'stale_version', incomingVersion: 1, currentVersion: 2 });
    expect(stale.tally.newCases).toBe(5);
    // Device A wrote version 2 itself; its next edit on base 1 is its own queue, not a disagreement.
    const own = await upsertTally(field2, { id, siteId: DEMO_IDS.lakeshoreWard, date: today, newCases: 6, baseVersion: 1 }, { deviceId: DEV_A });
    expect(own.status).toBe('applied');
    expect(own.tally.version).toBe(3);
  });

  it('deletes as a tombstone, frees the site and day, and makes a later edit an edit_deleted conflict', async () => {
    const { upsertTally, deleteTally, listTalliesByOutbreak } = await import('@/lib/db/tallies');
    const { Tally } = await import('@/models');
    const id = randomUUID();
    const date = today;
    const created = await upsertTally(field2, { id, siteId: DEMO_IDS.fennelVillage, date, newCases: 2 }, { deviceId: DEV_A });
    const del = await deleteTally(field2, id, { baseVersion: 1, deviceId: DEV_A });
    expect(del.status).toBe('applied');
    expect(del.tally.deletedAt).not.toBeNull();
    expect(del.tally.version).toBe(2);
    expect(del.tally.changeSeq).toBeGreaterThan(created.tally.changeSeq);
    const row = await Tally.findByPk(id);
    expect(row).not.toBeNull();
    expect(row!.deletedAt).not.toBeNull();
    const listed = await listTalliesByOutbreak(field2, DEMO_IDS.outbreak, { siteId: DEMO_IDS.fennelVillage, from: date, to: date });
    expect(listed.total).toBe(0);
    // Device B edits the version it saw before the delete.
    const edit = await upsertTally(field2, { id, siteId: DEMO_IDS.fennelVillage, date, newCases: 3, baseVersion: 1 }, { deviceId: DEV_B });
    expect(edit.status).toBe('conflict');
    expect(edit.conflict!.reason).toBe('edit_deleted');
    expect((await Tally.findByPk(id))!.deletedAt).not.toBeNull();
    // A second delete agrees with the first: nothing to settle.
    const again = await deleteTally(field2, id, { baseVersion: 1, deviceId: DEV_B });
    expect(again.status).toBe('unchanged');
    // The unique live index ignores tombstones: a new tally for the same site and day is allowed.
    const fresh = await upsertTally(field2, { id: randomUUID(), siteId: DEMO_IDS.fennelVillage, date, newCases: 1 }, { deviceId: DEV_A });
    expect(fresh.status).toBe('applied');
  });

  it('turns a delete of an older version into a stale_version conflict and keeps the tally', async () => {
    const { upsertTally, deleteTally } = await import('@/lib/db/tallies');
    const id = randomUUID();
    // Northgate School has no demo tally on day 9 of 24 (= 15 days ago): a gap.
    await upsertTally(field, { id, siteId: DEMO_IDS.northgateSchool, date: addDays(today, -15), newCases: 1 }, { deviceId: DEV_A });
    await upsertTally(field, { id, siteId: DEMO_IDS.northgateSchool, date: addDays(today, -15), newCases: 2, baseVersion: 1 }, { deviceId: DEV_A });
    const del = await deleteTally(field, id, { baseVersion: 1, deviceId: DEV_B });
    expect(del.status).toBe('conflict');
    expect(del.conflict).toMatchObject({ reason: 'stale_version', incoming: { op: 'delete', id, baseVersion: 1 } });
    expect(del.tally.deletedAt).toBeNull();
  });

  it('runs inside a caller’s transaction and rolls back with it', async () => {
    const { upsertTally } = await import('@/lib/db/tallies');
    const { writeTx } = await import('@/lib/db/connection');
    const { Tally } = await import('@/models');
    const id = randomUUID();
    await expect(writeTx(async (t) => {
      // Fennel Village, day 15 of the demo (9 days ago): no tally yet.
      const r = await upsertTally(coordinator, { id, siteId: DEMO_IDS.fennelVillage, date: addDays(today, -9), newCases: 1 }, { deviceId: null }, t);
      expect(r.status).toBe('applied');
      throw new Error('abort the batch');
    })).rejects.toThrow('abort the batch');
    expect(await Tally.findByPk(id)).toBeNull();
  });

  it('refuses bad values, future days and days before day 0 with field errors', async () => {
    const { POST } = await import('@/app/api/tallies/route');
    const neg = await call(POST as never, '/api/tallies', { method: 'POST', cookie: fieldCookie, body: { siteId: DEMO_IDS.alderCamp, date: today, newCases: -1 } });
    expect(neg.status).toBe(400);
    expect(neg.body.error.fields.newCases).toBe('Cannot be negative.');
    const frac = await call(POST as never, '/api/tallies', { method: 'POST', cookie: fieldCookie, body: { siteId: DEMO_IDS.alderCamp, date: today, newCases: 2.5 } });
    expect(frac.body.error.fields.newCases).toBe('Must be a whole number.');
    const future = await call(POST as never, '/api/tallies', { method: 'POST', cookie: fieldCookie, body: { siteId: DEMO_IDS.alderCamp, date: addDays(today, 3), newCases: 1 } });
    expect(future.status).toBe(400);
    expect(future.body.error.fields.date).toMatch(/future/);
    const early = await call(POST as never, '/api/tallies', { method: 'POST', cookie: fieldCookie, body: { siteId: DEMO_IDS.alderCamp, date: addDays(today, -40), newCases: 1 } });
    expect(early.status).toBe(400);
    expect(early.body.error.fields.date).toMatch(/day 0/);
  });

  it('answers a conflict through the route with 409, the kept record and the conflict', async () => {
    const { POST } = await import('@/app/api/outbreaks/[id]/tallies/route');
    const url = `/api/outbreaks/${DEMO_IDS.outbreak}/tallies`;
    const params = { id: DEMO_IDS.outbreak };
    const date = addDays(today, -3);
    const r = await call(POST as never, url, { method: 'POST', cookie: fieldCookie, params, body: { siteId: DEMO_IDS.alderCamp, date, newCases: 9999 } });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('conflict');
    expect(r.body.error.conflict.reason).toBe('duplicate_day');
    expect(r.body.error.tally.newCases).not.toBe(9999);
  });
});

describe('team scope through the routes', () => {
  const params = { id: DEMO_IDS.outbreak };
  const base = `/api/outbreaks/${DEMO_IDS.outbreak}`;

  it("refuses a field officer reading or writing another team's site with 403", async () => {
    const list = await import('@/app/api/outbreaks/[id]/tallies/route');
    const curve = await import('@/app/api/outbreaks/[id]/curve/route');
    const create = await import('@/app/api/tallies/route');
    const one = await import('@/app/api/tallies/[id]/route');
    const read = await call(list.GET as never, `${base}/tallies?site=${DEMO_IDS.lakeshoreWard}`, { cookie: fieldCookie, params });
    expect(read.status).toBe(403);
    expect(read.body.rows).toBeUndefined();
    const c = await call(curve.GET as never, `${base}/curve?site=${DEMO_IDS.lakeshoreWard}`, { cookie: fieldCookie, params });
    expect(c.status).toBe(403);
    const w = await call(create.POST as never, '/api/tallies', { method: 'POST', cookie: fieldCookie, body: { siteId: DEMO_IDS.lakeshoreWard, date: today, newCases: 1 } });
    expect(w.status).toBe(403);
    expect(w.body.error.code).toBe('forbidden');
    // A Lakeshore tally by id: neither readable nor deletable by the North officer.
    const { listTalliesByOutbreak } = await import('@/lib/db/tallies');
    const theirs = (await listTalliesByOutbreak(field2, DEMO_IDS.outbreak, { siteId: DEMO_IDS.lakeshoreWard, limit: 1 })).rows[0]!;
    const g = await call(one.GET as never, `/api/tallies/${theirs.id}`, { cookie: fieldCookie, params: { id: theirs.id } });
    expect(g.status).toBe(403);
    const d = await call(one.DELETE as never, `/api/tallies/${theirs.id}?baseVersion=${theirs.version}`, { method: 'DELETE', cookie: fieldCookie, params: { id: theirs.id } });
    expect(d.status).toBe(403);
    // Their own team's officer may.
    const ok = await call(list.GET as never, `${base}/tallies?site=${DEMO_IDS.lakeshoreWard}`, { cookie: field2Cookie, params });
    expect(ok.status).toBe(200);
    expect(ok.body.total).toBeGreaterThan(0);
  });

  it("shows a field officer only their teams' sites in the list and the outbreak curve", async () => {
    const list = await import('@/app/api/outbreaks/[id]/tallies/route');
    const curve = await import('@/app/api/outbreaks/[id]/curve/route');
    const north = new Set<string>([DEMO_IDS.alderCamp, DEMO_IDS.northgateSchool, DEMO_IDS.hollinCrossing]);
    const r = await call(list.GET as never, `${base}/tallies?limit=1000`, { cookie: fieldCookie, params });
    expect(r.status).toBe(200);
    expect(r.body.rows.length).toBeGreaterThan(0);
    for (const row of r.body.rows) expect(north.has(row.siteId)).toBe(true);
    const c = await call(curve.GET as never, `${base}/curve`, { cookie: fieldCookie, params });
    expect(c.body.curve.sitesInView).toBe(3);
    const all = await call(curve.GET as never, `${base}/curve`, { cookie: coordinatorCookie, params });
    expect(all.body.curve.sitesInView).toBe(5);
    const sum = (xs: { cases: number }[]) => xs.reduce((a, d) => a + d.cases, 0);
    expect(sum(all.body.curve.days)).toBeGreaterThan(sum(c.body.curve.days));
  });

  it('lets a supervisor read but not write', async () => {
    const list = await import('@/app/api/outbreaks/[id]/tallies/route');
    const r = await call(list.GET as never, `${base}/tallies`, { cookie: supervisorCookie, params });
    expect(r.status).toBe(200);
    const w = await call(list.POST as never, `${base}/tallies`, { method: 'POST', cookie: supervisorCookie, params, body: { siteId: DEMO_IDS.alderCamp, date: today, newCases: 1 } });
    expect(w.status).toBe(403);
  });
});

describe('list: pagination, filters, sort', () => {
  it('pages through one site’s tallies in a date range, sorted', async () => {
    const { listTalliesByOutbreak } = await import('@/lib/db/tallies');
    const { Outbreak } = await import('@/models');
    const start = String((await Outbreak.findByPk(DEMO_IDS.outbreak))!.startDate);
    const from = start;
    const to = addDays(start, 9);
    // Alder Camp has a demo tally on every day 0..23: 10 days in [day 0, day 9].
    const all = await listTalliesByOutbreak(coordinator, DEMO_IDS.outbreak, { siteId: DEMO_IDS.alderCamp, from, to, sort: 'date', limit: 100 });
    expect(all.total).toBe(10);
    expect(all.rows.map((r) => r.date)).toEqual(Array.from({ length: 10 }, (_, i) => addDays(start, i)));
    const page = await listTalliesByOutbreak(coordinator, DEMO_IDS.outbreak, { siteId: DEMO_IDS.alderCamp, from, to, sort: 'date', limit: 4, offset: 4 });
    expect(page.total).toBe(10);
    expect(page.rows.map((r) => r.date)).toEqual(all.rows.slice(4, 8).map((r) => r.date));
    const byCases = await listTalliesByOutbreak(coordinator, DEMO_IDS.outbreak, { from, to, sort: '-newCases', limit: 1000 });
    for (let i = 1; i < byCases.rows.length; i++) expect(byCases.rows[i - 1]!.newCases).toBeGreaterThanOrEqual(byCases.rows[i]!.newCases);
    for (const r of byCases.rows) expect(r.date >= from && r.date <= to).toBe(true);
    expect(byCases.people[field.id]).toBe('Ada Okafor');
  });

  it('shows the completeness grid with the demo gaps', async () => {
    const { getReportingGrid } = await import('@/lib/db/tallies');
    const grid = await getReportingGrid(coordinator, DEMO_IDS.outbreak, { from: addDays(today, -24), to: addDays(today, -1) });
    const fennel = grid.sites.find((s) => s.siteId === DEMO_IDS.fennelVillage)!;
    // Fennel Village's day 15 of 24 (9 days ago) was left unreported by the demo seed.
    expect(fennel.dates[addDays(today, -9)]).toBeUndefined();
    expect(fennel.dates[addDays(today, -10)]).toBeTypeOf('number');
  });
});

describe('epi curve', () => {
  it('matches a hand-computed case: daily sums, unreported days, 7-day mean, running sum, cut-off', async () => {
    const { createOutbreak, createSite } = await import('@/lib/db/outbreaks');
    const { upsertTally, deleteTally } = await import('@/lib/db/tallies');
    const { getEpiCurve } = await import('@/lib/db/curve');
    const { computeEpiCurve } = await import('@/lib/tallies/curve');
    const { loadActor } = await import('@/lib/db/users');
    const { User } = await import('@/models');
    const start = addDays(today, -9);
    const o = await createOutbreak(coordinator, { name: 'Curve check', disease: 'ILI', area: 'Test', population: 1000, startDate: start });
    const u = (await User.findByPk(coordinator.id))!;
    const coord = (await loadActor(u.id, u.sessionVersion))!; // re-read: now responsible for the new outbreak
    const A = await createSite(coord, { outbreakId: o.id, name: 'A', kind: 'camp', population: 500 });
    const B = await createSite(coord, { outbreakId: o.id, name: 'B', kind: 'camp', population: 500 });
    const a = [1, 2, 4, 0, null, 8, 5, 3, 6, null];
    const b = [2, null, 1, null, null, null, 4, null, null, null];
    for (let d = 0; d < 10; d++) {
      if (a[d] !== null) await upsertTally(coord, { siteId: A.id, date: addDays(start, d), newCases: a[d]! }, { deviceId: null });
      if (b[d] !== null) await upsertTally(coord, { siteId: B.id, date: addDays(start, d), newCases: b[d]! }, { deviceId: null });
    }
    // A deleted tally must not count.
    const gone = await upsertTally(coord, { siteId: B.id, date: addDays(start, 4), newCases: 100 }, { deviceId: null });
    await deleteTally(coord, gone.tally.id, { baseVersion: 1, deviceId: null });

    const curve = await getEpiCurve(coord, o.id, { today });
    // [calc] by hand: cases per day = A + B.
    expect(curve.days.map((d) => d.cases)).toEqual([3, 2, 5, 0, 0, 8, 9, 3, 6, 0]);
    expect(curve.days.map((d) => d.reportingSites)).toEqual([2, 1, 2, 1, 0, 1, 2, 1, 1, 0]);
    // Day 3: A reported 0 (a real zero); days 4 and 9: no site reported.
    expect(curve.days.map((d) => d.reported)).toEqual([true, true, true, true, false, true, true, true, true, false]);
    // [calc] running sum 3, 3+2, …
    expect(curve.days.map((d) => d.cumulative)).toEqual([3, 5, 10, 10, 10, 18, 27, 30, 36, 36]);
    // [calc] trailing 7-day mean, defined from day 6: (3+2+5+0+0+8+9)/7 = 27/7, (2+5+0+0+8+9+3)/7 = 27/7,
    // (5+0+0+8+9+3+6)/7 = 31/7, (0+0+8+9+3+6+0)/7 = 26/7.
    const avg = curve.days.map((d) => d.avg7);
    expect(avg.slice(0, 6)).toEqual([null, null, null, null, null, null]);
    [27 / 7, 27 / 7, 31 / 7, 26 / 7].forEach((v, i) => expect(avg[6 + i]).toBeCloseTo(v, 12));
    // Cut-off: the last day before today on which more than half of the 2 sites (i.e. both) reported: day 6.
    expect(curve.cutoff).toBe(addDays(start, 6));
    expect(curve.sitesInView).toBe(2);

    const siteA = await getEpiCurve(coord, o.id, { siteId: A.id, today });
    expect(siteA.days.map((d) => d.cases)).toEqual([1, 2, 4, 0, 0, 8, 5, 3, 6, 0]);
    expect(siteA.cutoff).toBe(addDays(start, 8));

    // [calc] the device-side computation gives the same curve from the same tallies.
    const { listTalliesByOutbreak } = await import('@/lib/db/tallies');
    const rows = (await listTalliesByOutbreak(coord, o.id, { limit: 1000 })).rows;
    const local = computeEpiCurve(rows, { startDate: start, today, sitesInView: 2 });
    expect(local.days).toEqual(curve.days);
    expect(local.cutoff).toBe(curve.cutoff);
  });
});
