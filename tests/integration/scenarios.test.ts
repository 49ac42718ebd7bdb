import { call, prepare, sessionCookie } from '../helpers/server';
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import * as list from '@/app/api/outbreaks/[id]/scenarios/route';
import * as one from '@/app/api/scenarios/[id]/route';
import * as official from '@/app/api/scenarios/[id]/official/route';

let field: string, field2: string, coordinator: string, supervisor: string, admin: string;
let otherOutbreak: string;

const O: string = DEMO_IDS.outbreak;
const input = (beta = 0.5) => ({
  model: 'SIR', population: 12660, initial: { I: 3 }, params: { beta, gamma: 0.25 }, method: 'rk4', step: 0.25, days: 120,
  capacity: { admissionFraction: 0.03, lengthOfStay: 5, beds: 40 },
});

const save = (cookie: string, body: unknown, outbreakId = O) =>
  call(list.POST, `/api/outbreaks/${outbreakId}/scenarios`, { method: 'POST', body, cookie, params: { id: outbreakId } });
const listOf = (cookie: string, outbreakId = O) =>
  call(list.GET, `/api/outbreaks/${outbreakId}/scenarios`, { cookie, params: { id: outbreakId } });
const publish = (cookie: string, id: string, value = true) =>
  call(official.POST, `/api/scenarios/${id}/official`, { method: 'POST', body: { official: value }, cookie, params: { id } });

beforeAll(async () => {
  await prepare();
  [field, field2, coordinator, supervisor, admin] = await Promise.all(
    ['field', 'field2', 'coordinator', 'supervisor', 'admin'].map((u) => sessionCookie(`${u}@marrowbend.example`)),
  ) as [string, string, string, string, string];
  // A second outbreak that only the coordinator who opens it belongs to.
  const { createOutbreak } = await import('@/lib/db/outbreaks');
  const { loadActor } = await import('@/lib/db/users');
  const { User } = await import('@/models');
  const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
  const actor = (await loadActor(u.id, u.sessionVersion))!;
  otherOutbreak = (await createOutbreak(actor, { name: 'Elsewhere', disease: 'ILI', area: 'Far district', population: 5000, startDate: '2026-01-01' })).id;
});

describe('scenario routes', () => {
  it('answer 401 signed out', async () => {
    expect((await call(list.GET, `/api/outbreaks/${O}/scenarios`, { params: { id: O } })).status).toBe(401);
    expect((await call(list.POST, `/api/outbreaks/${O}/scenarios`, { method: 'POST', body: { name: 'x', input: input() }, params: { id: O } })).status).toBe(401);
  });

  it('save and list a scenario for the outbreak, with a client-made id, and keep the input as sent', async () => {
    const id = randomUUID();
    const r = await save(field, { id, name: 'Baseline', input: input(), notes: { source: 'manual' } });
    expect(r.status).toBe(200);
    expect(r.body.scenario).toMatchObject({ id, outbreakId: O, name: 'Baseline', official: false, version: 1, notes: { source: 'manual' } });
    expect(r.body.scenario.input).toEqual(input());
    const l = await listOf(field2);
    expect(l.status).toBe(200);
    expect(l.body.scenarios.map((s: { id: string }) => s.id)).toContain(id);
    // The same id again is an update, a new version; a stale baseVersion is refused (409).
    const again = await save(field, { id, name: 'Baseline v2', input: input(0.6), baseVersion: 1 });
    expect(again.body.scenario).toMatchObject({ version: 2, name: 'Baseline v2' });
    const stale = await save(field2, { id, name: 'Old edit', input: input(), baseVersion: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.currentVersion).toBe(2);
  });

  it('validate the saved scenario with the engine schema (400 with field paths)', async () => {
    const r = await save(field, { name: '', input: { ...input(), params: { beta: 0.5, gamma: 0 } } });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty(['name']);
    expect(r.body.error.fields).toHaveProperty(['input.params.gamma']);
  });

  it('publish an official forecast by a coordinator only, at most one per outbreak', async () => {
    const a = (await save(field, { name: 'Fit A', input: input(0.55) })).body.scenario;
    const b = (await save(field, { name: 'Fit B', input: input(0.45) })).body.scenario;
    // A field officer may not publish, neither by the route nor by saving with official: true.
    const denied = await publish(field, a.id);
    expect(denied.status).toBe(403);
    expect((await save(field, { name: 'Sneaky', input: input(), official: true })).status).toBe(403);
    expect((await publish(supervisor, a.id)).status).toBe(403);

    const pa = await publish(coordinator, a.id);
    expect(pa.status).toBe(200);
    expect(pa.body.scenario.official).toBe(true);
    const pb = await publish(coordinator, b.id);
    expect(pb.body.scenario.official).toBe(true);
    const l = (await listOf(coordinator)).body.scenarios as Array<{ id: string; official: boolean }>;
    expect(l.filter((s) => s.official).map((s) => s.id)).toEqual([b.id]);
    expect(l[0]!.id).toBe(b.id); // the official one first

    // The official forecast may not be changed or deleted by a field officer.
    const edit = await call(one.PUT, `/api/scenarios/${b.id}`, { method: 'PUT', body: { name: 'Changed', input: input() }, cookie: field, params: { id: b.id } });
    expect(edit.status).toBe(403);
    const del = await call(one.DELETE, `/api/scenarios/${b.id}`, { method: 'DELETE', cookie: field, params: { id: b.id } });
    expect(del.status).toBe(403);

    // Publishing is recorded in the sync ledger.
    const { listLedger } = await import('@/lib/db/ledger');
    const { rows } = await listLedger({});
    expect(rows.filter((r) => r.kind === 'forecast.publish').length).toBeGreaterThanOrEqual(2);
  });

  it('keep to the outbreak scope: no reading or writing another outbreak', async () => {
    expect((await listOf(field, otherOutbreak)).status).toBe(403);
    expect((await save(field, { name: 'x', input: input() }, otherOutbreak)).status).toBe(403);
    expect((await listOf(coordinator, otherOutbreak)).status).toBe(200);
    const mine = (await save(coordinator, { name: 'Far', input: input() }, otherOutbreak)).body.scenario;
    expect((await call(one.GET, `/api/scenarios/${mine.id}`, { cookie: field, params: { id: mine.id } })).status).toBe(403);
    // An id of one outbreak cannot be saved into another.
    expect((await save(coordinator, { id: mine.id, name: 'Moved', input: input() }, O)).status).toBe(409);
    // Supervisors read but do not write; admins do neither.
    expect((await listOf(supervisor)).status).toBe(200);
    expect((await save(supervisor, { name: 'x', input: input() })).status).toBe(403);
    expect((await listOf(admin)).status).toBe(403);
  });

  it('delete by tombstone: gone from the list, kept in the table', async () => {
    const s = (await save(field, { name: 'Temporary', input: input() })).body.scenario;
    const d = await call(one.DELETE, `/api/scenarios/${s.id}?baseVersion=1`, { method: 'DELETE', cookie: field2, params: { id: s.id } });
    expect(d.status).toBe(200);
    expect(d.body.scenario.deletedAt).not.toBeNull();
    const l = (await listOf(field)).body.scenarios as Array<{ id: string }>;
    expect(l.map((x) => x.id)).not.toContain(s.id);
    const { Scenario } = await import('@/models');
    const row = await Scenario.findByPk(s.id);
    expect(row?.deletedAt).toBeTruthy();
    expect(Number(row?.version)).toBe(2);
    expect((await call(one.GET, `/api/scenarios/${s.id}`, { cookie: field, params: { id: s.id } })).status).toBe(404);
  });

  it('upsertScenario joins a caller transaction (as the sync push will)', async () => {
    const { upsertScenario } = await import('@/lib/db/scenarios');
    const { writeTx } = await import('@/lib/db/connection');
    const { loadActor } = await import('@/lib/db/users');
    const { User, Scenario } = await import('@/models');
    const u = (await User.findOne({ where: { email: 'field@marrowbend.example' } }))!;
    const actor = (await loadActor(u.id, u.sessionVersion))!;
    const id = randomUUID();
    // The transaction rolls back: the scenario written inside it must not exist afterwards.
    await expect(
      writeTx(async (t) => {
        await upsertScenario(actor, { id, outbreakId: O, name: 'In a batch', input: input() as never }, { deviceId: 'dev-1' }, t);
        expect(await Scenario.findByPk(id, { transaction: t })).not.toBeNull();
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    expect(await Scenario.findByPk(id)).toBeNull();
    const kept = await writeTx((t) => upsertScenario(actor, { id, outbreakId: O, name: 'In a batch', input: input() as never }, { deviceId: 'dev-1' }, t));
    expect(kept).toMatchObject({ id, deviceId: 'dev-1', version: 1 });
  });
});
