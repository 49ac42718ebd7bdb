/**
 * The capacity alert against a real SQLite file and the real mail path (the local catcher): the
 * check itself, and the check that runs on its own after a forecast is published or the official
 * one is edited (lib/db/scenarios.ts), in the background: each count waits with settleMail() first.
 */
import { call, prepare, sessionCookie } from '../helpers/server';
import { randomUUID } from 'node:crypto';
import { createServer } from 'node:net';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import { mailTo, startTestCatcher } from './mail-helpers';
import type { Catcher } from '../../scripts/mail-catcher.mjs';
import type { Actor } from '@/lib/auth/actor';

let catcher: Catcher;
let coordinator: Actor;
let startDate: string;

/** An SIR wave whose bed demand crosses 40 beds on day 32 (day 0 = 24 days ago) [calc: simulate + summarize below]. */
const INPUT = {
  model: 'SIR' as const, population: 12660, initial: { I: 5 }, params: { beta: 0.5, gamma: 1 / 3 },
  capacity: { admissionFraction: 0.05, lengthOfStay: 5, beds: 40 }, method: 'rk4' as const, step: 0.25, days: 120,
};
const NOTES = { source: 'fit' as const, fit: { dataUntil: 23, R0: 1.5, R0Range: [1.4, 1.6] as [number, number], infectiousPeriod: 3, infectiousPeriodRange: [2.8, 3.2] as [number, number], flags: [] } };

async function publish(name: string, input: typeof INPUT | Record<string, unknown>, id?: string) {
  const { upsertScenario } = await import('@/lib/db/scenarios');
  return upsertScenario(coordinator, { id, outbreakId: DEMO_IDS.outbreak, name, input: input as typeof INPUT, official: true, notes: NOTES }, { deviceId: null });
}

/** Waits for the checks that publishing started in the background. */
async function settle() {
  const { settleMail } = await import('@/lib/mail/transport');
  await settleMail();
}

/** Capacity alerts the coordinator has received (the demo outbreak has one coordinator). */
async function alertMails() {
  return (await mailTo('coordinator@marrowbend.example')).filter((m) => m.subject.startsWith('Capacity alert'));
}

async function alertRows(scenarioId: string) {
  const { CapacityAlert } = await import('@/models');
  return CapacityAlert.findAll({ where: { scenarioId }, order: [['createdAt', 'ASC']] });
}

beforeAll(async () => {
  await prepare();
  catcher = await startTestCatcher();
  const { User, Outbreak } = await import('@/models');
  const { loadActor } = await import('@/lib/db/users');
  const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
  coordinator = (await loadActor(u.id, u.sessionVersion))!;
  startDate = String((await Outbreak.findByPk(DEMO_IDS.outbreak))!.startDate);
});
afterAll(async () => {
  await catcher?.close();
});

describe('capacity alert', () => {
  it('fires once for an official forecast that exceeds the beds within 14 days, naming the day and the range', async () => {
    // [calc] the day, independently: the engine's plain run and its bed-demand series.
    const { simulate, summarize } = await import('@/lib/model');
    const { addDays, daysBetween, utcToday } = await import('@/lib/tallies/dates');
    const s = summarize(simulate(INPUT), INPUT);
    const todayIdx = daysBetween(startDate, utcToday());
    const first = Array.from(s.bedDemand!).findIndex((v, i) => i >= todayIdx && v > 40);
    expect(first - todayIdx).toBeGreaterThanOrEqual(0);
    expect(first - todayIdx).toBeLessThanOrEqual(14);
    const expectedDay = addDays(startDate, first);

    // Publishing is all it takes: the check runs after the save commits.
    const scenario = await publish('Official wave', INPUT);
    await settle();
    const rows = await alertRows(scenario.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.scenarioVersion).toBe(scenario.version);
    expect(rows[0]!.firstDay).toBe(expectedDay);
    const detail = JSON.parse(rows[0]!.detail) as { earliest: string | null; latest: string | null; status: string; to: string[] };
    expect(detail.status).toBe('sent');
    expect(detail.to).toEqual(['coordinator@marrowbend.example']);
    // The band's crossings bracket the central day.
    expect(detail.earliest! <= expectedDay).toBe(true);
    expect(detail.latest === null || detail.latest >= expectedDay).toBe(true);

    const mails = await mailTo('coordinator@marrowbend.example');
    expect(mails).toHaveLength(1);
    const { formatDay } = await import('@/lib/mail/format');
    expect(mails[0]!.subject).toBe(`Capacity alert Marrow Bend ILI: beds exceeded from ${formatDay(expectedDay)}`);
    expect(mails[0]!.text).toContain(`above the 40 beds available from ${formatDay(expectedDay)}`);
    expect(mails[0]!.text).toContain(`between ${formatDay(detail.earliest!)} and`);
    expect(mails[0]!.html).toContain('Open the sitrep');

    // Not twice: the same forecast version never alerts again.
    const { checkCapacityAlert } = await import('@/lib/db/alerts');
    const r2 = await checkCapacityAlert(DEMO_IDS.outbreak);
    expect(r2).toMatchObject({ status: 'already_sent', scenarioId: scenario.id, version: scenario.version, day: expectedDay });
    expect(await mailTo('coordinator@marrowbend.example')).toHaveLength(1);
    const { LedgerEntry, CapacityAlert } = await import('@/models');
    expect(await LedgerEntry.count({ where: { kind: 'capacity_alert' } })).toBe(1);
    expect(await CapacityAlert.count()).toBe(1);
  });

  it('two checks at once on a new forecast version send one alert', async () => {
    const { Scenario } = await import('@/models');
    const current = (await Scenario.findOne({ where: { outbreakId: DEMO_IDS.outbreak, official: true } }))!;
    // A new version written straight to the table, so that no check starts on its own: the three below race alone.
    await current.update({ name: 'Official wave (revised)', input: JSON.stringify({ ...INPUT, initial: { I: 6 } }), version: Number(current.version) + 1 });
    const { checkCapacityAlert } = await import('@/lib/db/alerts');
    const results = await Promise.all([checkCapacityAlert(DEMO_IDS.outbreak), checkCapacityAlert(DEMO_IDS.outbreak), checkCapacityAlert(DEMO_IDS.outbreak)]);
    expect(results.filter((r) => r.status === 'sent')).toHaveLength(1);
    expect(results.filter((r) => r.status === 'already_sent')).toHaveLength(2);
    expect(await mailTo('coordinator@marrowbend.example')).toHaveLength(2);
  });

  it('stays silent when the forecast stays within the beds, or has no official forecast', async () => {
    const { Scenario } = await import('@/models');
    const current = (await Scenario.findOne({ where: { outbreakId: DEMO_IDS.outbreak, official: true } }))!;
    await publish('Plenty of beds', { ...INPUT, capacity: { ...INPUT.capacity, beds: 5000 } }, current.id);
    await settle();
    expect(await mailTo('coordinator@marrowbend.example')).toHaveLength(2);
    const { checkCapacityAlert } = await import('@/lib/db/alerts');
    expect((await checkCapacityAlert(DEMO_IDS.outbreak)).status).toBe('within_capacity');
    const { setOfficial } = await import('@/lib/db/scenarios');
    await setOfficial(coordinator, current.id, false);
    expect((await checkCapacityAlert(DEMO_IDS.outbreak)).status).toBe('no_official_forecast');
    expect(await mailTo('coordinator@marrowbend.example')).toHaveLength(2);
  });

  it('the check route needs forecast:publish in the outbreak', async () => {
    const { POST } = await import('@/app/api/outbreaks/[id]/sitrep/capacity-check/route');
    const supervisor = await sessionCookie('supervisor@marrowbend.example');
    const coord = await sessionCookie('coordinator@marrowbend.example');
    const url = `/api/outbreaks/${DEMO_IDS.outbreak}/sitrep/capacity-check`;
    expect((await call(POST as never, url, { method: 'POST', cookie: supervisor, body: {}, params: { id: DEMO_IDS.outbreak } })).status).toBe(403);
    const ok = await call(POST as never, url, { method: 'POST', cookie: coord, body: {}, params: { id: DEMO_IDS.outbreak } });
    expect(ok.status).toBe(200);
    expect(ok.body.check.status).toBe('no_official_forecast');
  });
});

describe('capacity alert when the official forecast changes', () => {
  type H = Parameters<typeof call>[0];
  let create: H, put: H, official: H, push: H, devices: H;
  let coord: string;
  const O = DEMO_IDS.outbreak;

  beforeAll(async () => {
    create = (await import('@/app/api/outbreaks/[id]/scenarios/route')).POST as H;
    put = (await import('@/app/api/scenarios/[id]/route')).PUT as H;
    official = (await import('@/app/api/scenarios/[id]/official/route')).POST as H;
    push = (await import('@/app/api/sync/push/route')).POST as H;
    devices = (await import('@/app/api/devices/route')).POST as H;
    coord = await sessionCookie('coordinator@marrowbend.example');
  });

  const save = (name: string, input: Record<string, unknown>, isOfficial = false) =>
    call(create, `/api/outbreaks/${O}/scenarios`, { method: 'POST', cookie: coord, body: { name, input, official: isOfficial, notes: NOTES }, params: { id: O } });
  const edit = (id: string, body: Record<string, unknown>) => call(put, `/api/scenarios/${id}`, { method: 'PUT', cookie: coord, body, params: { id } });
  const makeOfficial = (id: string, value = true) =>
    call(official, `/api/scenarios/${id}/official`, { method: 'POST', cookie: coord, body: { official: value }, params: { id } });

  it('making a scenario over the beds official mails once; official again, re-saved unchanged or re-published sends none more; a changed forecast one more', async () => {
    const before = (await alertMails()).length;
    const saved = await save('Route wave', INPUT);
    expect(saved.status).toBe(200);
    const id = saved.body.scenario.id as string;
    await settle();
    // Saved but not official: nothing to alert on.
    expect(await alertMails()).toHaveLength(before);

    const r1 = await makeOfficial(id);
    expect(r1.status).toBe(200);
    expect(r1.body.scenario.official).toBe(true);
    await settle();
    expect(await alertMails()).toHaveLength(before + 1);
    expect((await alertRows(id)).map((r) => r.scenarioVersion)).toEqual([r1.body.scenario.version]);

    // Official again: no new version, no new alert.
    const r2 = await makeOfficial(id);
    expect(r2.status).toBe(200);
    expect(r2.body.scenario.version).toBe(r1.body.scenario.version);
    await settle();
    expect(await alertMails()).toHaveLength(before + 1);

    // Re-saved unchanged: the record gets a new version, the forecast is the same one.
    const same = await edit(id, { name: 'Route wave', input: INPUT, official: true, notes: NOTES, baseVersion: r2.body.scenario.version });
    expect(same.status).toBe(200);
    expect(same.body.scenario.version).toBe(r2.body.scenario.version + 1);
    await settle();
    expect(await alertMails()).toHaveLength(before + 1);

    // Withdrawn and published again: still the same forecast.
    expect((await makeOfficial(id, false)).status).toBe(200);
    const again = await makeOfficial(id);
    expect(again.body.scenario.official).toBe(true);
    await settle();
    expect(await alertMails()).toHaveLength(before + 1);
    expect(await alertRows(id)).toHaveLength(1);

    // An edit that changes the forecast (more seeded cases) and stays over the beds: one more.
    const changed = await edit(id, { name: 'Route wave', input: { ...INPUT, initial: { I: 7 } }, notes: NOTES, baseVersion: again.body.scenario.version });
    expect(changed.status).toBe(200);
    expect(changed.body.scenario.official).toBe(true);
    await settle();
    const mails = await alertMails();
    expect(mails).toHaveLength(before + 2);
    expect(mails.at(-1)!.text).toContain(`"Route wave", version ${changed.body.scenario.version}`);
    expect((await alertRows(id)).map((r) => r.scenarioVersion)).toEqual([r1.body.scenario.version, changed.body.scenario.version]);
  });

  it('a forecast within the beds sends none, published or edited', async () => {
    const before = (await alertMails()).length;
    const roomy = { ...INPUT, capacity: { ...INPUT.capacity, beds: 5000 } };
    const r = await save('Roomy wave', roomy, true);
    expect(r.status).toBe(200);
    expect(r.body.scenario.official).toBe(true);
    const id = r.body.scenario.id as string;
    const e = await edit(id, { name: 'Roomy wave', input: { ...roomy, initial: { I: 7 } }, notes: NOTES, baseVersion: r.body.scenario.version });
    expect(e.status).toBe(200);
    await settle();
    expect(await alertMails()).toHaveLength(before);
    expect(await alertRows(id)).toHaveLength(0);
    // The check sees this forecast and finds it within the beds (not, say, a missing forecast).
    const { checkCapacityAlert } = await import('@/lib/db/alerts');
    expect(await checkCapacityAlert(O)).toMatchObject({ status: 'within_capacity', scenarioId: id, version: e.body.scenario.version });
  });

  it('an edit of the official forecast pushed from a device alerts once the batch has committed', async () => {
    const { Scenario } = await import('@/models');
    const current = (await Scenario.findOne({ where: { outbreakId: O, official: true } }))!;
    const before = (await alertMails()).length;
    const deviceId = randomUUID();
    expect((await call(devices, '/api/devices', { method: 'POST', cookie: coord, body: { id: deviceId, label: 'Coordinator tablet' } })).status).toBe(200);
    const res = await call(push, '/api/sync/push', {
      method: 'POST', cookie: coord,
      body: {
        deviceId,
        mutations: [{
          mutationId: randomUUID(), seq: 1, entity: 'scenario', entityId: current.id, op: 'upsert', baseVersion: Number(current.version),
          payload: { outbreakId: O, name: current.name, input: INPUT, official: true, notes: NOTES }, recordedAt: new Date().toISOString(),
        }],
      },
    });
    expect(res.status).toBe(200);
    expect(res.body.results[0].fate).toBe('applied');
    await settle();
    expect(await alertMails()).toHaveLength(before + 1);
    expect((await alertRows(current.id)).map((r) => r.scenarioVersion)).toEqual([Number(current.version) + 1]);
  });

  it('a mail server that is down leaves the forecast official and the answer a success; publishing again retries', async () => {
    const { LedgerEntry, Scenario } = await import('@/models');
    // A loopback port nobody listens on: taken, then freed.
    const closed = await new Promise<number>((resolve) => {
      const srv = createServer().listen(0, '127.0.0.1', () => {
        const port = (srv.address() as { port: number }).port;
        srv.close(() => resolve(port));
      });
    });
    const saved = await save('Down wave', INPUT);
    const id = saved.body.scenario.id as string;
    const before = (await alertMails()).length;
    const failedBefore = await LedgerEntry.count({ where: { kind: 'capacity_alert_failed' } });
    const goodUrl = process.env.SMTP_URL;
    const errors = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    try {
      process.env.SMTP_URL = `smtp://127.0.0.1:${closed}`;
      const r = await makeOfficial(id);
      expect(r.status).toBe(200);
      expect(r.body.scenario.official).toBe(true);
      await settle();
      expect(Boolean((await Scenario.findByPk(id))!.official)).toBe(true);
      expect(await alertRows(id)).toHaveLength(0);
      expect(await LedgerEntry.count({ where: { kind: 'capacity_alert_failed' } })).toBe(failedBefore + 1);
      expect(errors.mock.calls.some((c) => String(c[0]).startsWith(`capacity alert for outbreak ${O} failed`))).toBe(true);
    } finally {
      process.env.SMTP_URL = goodUrl;
      errors.mockRestore();
    }
    expect(await alertMails()).toHaveLength(before);
    // The claim was released, so publishing again (already official) sends it now.
    expect((await makeOfficial(id)).status).toBe(200);
    await settle();
    expect(await alertMails()).toHaveLength(before + 1);
    expect(await alertRows(id)).toHaveLength(1);
  });
});
