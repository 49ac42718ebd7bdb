import { call, prepare, sessionCookie } from '../helpers/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
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

    const scenario = await publish('Official wave', INPUT);
    const { checkCapacityAlert } = await import('@/lib/db/alerts');
    const r1 = await checkCapacityAlert(DEMO_IDS.outbreak);
    expect(r1.status).toBe('sent');
    if (r1.status !== 'sent') return;
    expect(r1.day).toBe(expectedDay);
    expect(r1.scenarioId).toBe(scenario.id);
    expect(r1.recipients).toEqual(['coordinator@marrowbend.example']);
    // The band's crossings bracket the central day.
    expect(r1.earliest! <= r1.day).toBe(true);
    expect(r1.latest === null || r1.latest >= r1.day).toBe(true);

    const mails = await mailTo('coordinator@marrowbend.example');
    expect(mails).toHaveLength(1);
    const { formatDay } = await import('@/lib/mail/format');
    expect(mails[0]!.subject).toBe(`Capacity alert Marrow Bend ILI: beds exceeded from ${formatDay(expectedDay)}`);
    expect(mails[0]!.text).toContain(`above the 40 beds available from ${formatDay(expectedDay)}`);
    expect(mails[0]!.text).toContain(`between ${formatDay(r1.earliest!)} and`);
    expect(mails[0]!.html).toContain('Open the sitrep');

    // Not twice: the same forecast version never alerts again.
    const r2 = await checkCapacityAlert(DEMO_IDS.outbreak);
    expect(r2.status).toBe('already_sent');
    expect(await mailTo('coordinator@marrowbend.example')).toHaveLength(1);
    const { LedgerEntry, CapacityAlert } = await import('@/models');
    expect(await LedgerEntry.count({ where: { kind: 'capacity_alert' } })).toBe(1);
    expect(await CapacityAlert.count()).toBe(1);
  });

  it('two checks at once on a new forecast version send one alert', async () => {
    const { Scenario } = await import('@/models');
    const current = (await Scenario.findOne({ where: { outbreakId: DEMO_IDS.outbreak, official: true } }))!;
    await publish('Official wave (revised)', { ...INPUT, initial: { I: 6 } }, current.id);
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
