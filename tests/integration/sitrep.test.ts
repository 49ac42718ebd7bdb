import { call, prepare, sessionCookie } from '../helpers/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import { mailTo, startTestCatcher } from './mail-helpers';
import type { Catcher } from '../../scripts/mail-catcher.mjs';

let catcher: Catcher;
let coordinator: string, supervisor: string, field: string;
const url = `/api/outbreaks/${DEMO_IDS.outbreak}/sitrep`;
const params = { id: DEMO_IDS.outbreak };

beforeAll(async () => {
  await prepare();
  catcher = await startTestCatcher();
  [coordinator, supervisor, field] = (await Promise.all(['coordinator', 'supervisor', 'field'].map((u) => sessionCookie(`${u}@marrowbend.example`)))) as [string, string, string];
});
afterAll(async () => {
  await catcher?.close();
});

async function sitrep(cookie: string) {
  const { GET } = await import('@/app/api/outbreaks/[id]/sitrep/route');
  return call(GET as never, url, { cookie, params });
}

describe('sitrep', () => {
  it('counts cases to date, per site and in the last week exactly as the tallies hold them', async () => {
    const res = await sitrep(coordinator);
    expect(res.status).toBe(200);
    const s = res.body.sitrep;
    const { db } = await import('@/lib/db/connection');
    const q = await db();
    // [calc] straight SQL sums over the live tallies.
    const [[total]] = (await q.query('SELECT SUM(new_cases) AS n FROM tallies WHERE outbreak_id = ? AND deleted_at IS NULL', { replacements: [DEMO_IDS.outbreak] })) as [Array<{ n: number }>, unknown];
    expect(s.casesToDate).toBe(Number(total!.n));
    const [perSite] = (await q.query('SELECT site_id AS id, SUM(new_cases) AS n FROM tallies WHERE outbreak_id = ? AND deleted_at IS NULL GROUP BY site_id', { replacements: [DEMO_IDS.outbreak] })) as [Array<{ id: string; n: number }>, unknown];
    for (const row of perSite) expect(s.sites.find((x: { id: string }) => x.id === row.id).cases).toBe(Number(row.n));
    const { addDays } = await import('@/lib/tallies/dates');
    const [[week]] = (await q.query('SELECT SUM(new_cases) AS n FROM tallies WHERE outbreak_id = ? AND deleted_at IS NULL AND date BETWEEN ? AND ?', { replacements: [DEMO_IDS.outbreak, addDays(s.cutoff, -6), s.cutoff] })) as [Array<{ n: number }>, unknown];
    expect(s.casesLast7).toBe(Number(week!.n));
    expect(s.sites).toHaveLength(5);
  });

  it('reports growth, doubling time and Rt with intervals that hold together', async () => {
    const s = (await sitrep(coordinator)).body.sitrep;
    expect(s.growth.interval[0]).toBeLessThan(s.growth.r);
    expect(s.growth.interval[1]).toBeGreaterThan(s.growth.r);
    // [pub] doubling time = ln 2 / r (exponential growth).
    if (s.growth.r > 0) expect(s.growth.doublingTime).toBeCloseTo(Math.LN2 / s.growth.r, 0);
    expect(s.rt.lo).toBeLessThanOrEqual(s.rt.mean);
    expect(s.rt.hi).toBeGreaterThanOrEqual(s.rt.mean);
    expect(s.rt.date).toBe(s.cutoff);
  });

  it('computes the forecast for the report when no official forecast is published, and says so', async () => {
    const s = (await sitrep(coordinator)).body.sitrep;
    expect(s.forecast.source).toBe('computed');
    expect(s.forecast.method).toMatch(/^Computed for this report/);
    expect(s.forecast.banded).toBe(true);
    const { incidence } = s.forecast;
    for (let i = 0; i < incidence.p50.length; i++) {
      expect(incidence.p5[i]).toBeLessThanOrEqual(incidence.p50[i] + 1e-9);
      expect(incidence.p95[i]).toBeGreaterThanOrEqual(incidence.p50[i] - 1e-9);
    }
    expect(s.forecast.beds).toBe(40);
    expect(s.forecast.bedDemand.p50.length).toBe(s.forecast.dates.length);
  });

  it('uses the official forecast when there is one: its own run is the central line', async () => {
    const { upsertScenario } = await import('@/lib/db/scenarios');
    const { loadActor } = await import('@/lib/db/users');
    const { User } = await import('@/models');
    const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
    const actor = (await loadActor(u.id, u.sessionVersion))!;
    const input = { model: 'SIR' as const, population: 12660, initial: { I: 5 }, params: { beta: 0.5, gamma: 1 / 3 }, capacity: { admissionFraction: 0.05, lengthOfStay: 5, beds: 40 }, method: 'rk4' as const, step: 0.25, days: 90 };
    await upsertScenario(actor, { outbreakId: DEMO_IDS.outbreak, name: 'Published wave', input, official: true, notes: { source: 'fit', fit: { dataUntil: 23, R0: 1.5, R0Range: [1.4, 1.6], infectiousPeriod: 3, infectiousPeriodRange: [2.8, 3.2], flags: [] } } }, { deviceId: null });
    await upsertScenario(actor, { outbreakId: DEMO_IDS.outbreak, name: 'Half the contacts from day 28', input: { ...input, interventions: [{ startDay: 28, contactReduction: 0.5 }] } }, { deviceId: null });
    const s = (await sitrep(coordinator)).body.sitrep;
    expect(s.forecast.source).toBe('official');
    expect(s.forecast.name).toBe('Published wave');
    // [calc] the central line is the published scenario's own run (simulate), day by day.
    const { simulate, summarize } = await import('@/lib/model');
    const run = simulate(input);
    const bed = summarize(run, input).bedDemand!;
    for (const d of [10, 30, 45, 60]) {
      expect(s.forecast.incidence.p50[d]).toBeCloseTo(run.incidence[d]!, 2);
      expect(s.forecast.bedDemand.p50[d]).toBeCloseTo(bed[d]!, 2);
    }
    expect(s.scenarios.map((x: { name: string }) => x.name)).toEqual(['Published wave', 'Half the contacts from day 28']);
    const cut = s.scenarios[1];
    expect(cut.interventions).toBe('−50% contacts from day 28');
    expect(cut.attackRate).toBeLessThan(s.scenarios[0].attackRate);
  });

  it('lets supervisors and field officers read it (field officers their own sites only) but not send it', async () => {
    expect((await sitrep(supervisor)).status).toBe(200);
    const mine = (await sitrep(field)).body.sitrep;
    expect(mine.sites.map((x: { name: string }) => x.name).sort()).toEqual(['Alder Camp', 'Hollin Crossing', 'Northgate School']);
    const { POST } = await import('@/app/api/outbreaks/[id]/sitrep/send/route');
    for (const cookie of [supervisor, field]) {
      expect((await call(POST as never, `${url}/send`, { method: 'POST', cookie, body: {}, params })).status).toBe(403);
    }
  });

  it('"Send to coordinators" mails the key figures as the page shows them and writes who sent what', async () => {
    const { POST } = await import('@/app/api/outbreaks/[id]/sitrep/send/route');
    const res = await call(POST as never, `${url}/send`, { method: 'POST', cookie: coordinator, body: {}, params });
    expect(res.status).toBe(200);
    expect(res.body.recipients).toEqual(['coordinator@marrowbend.example']);
    const s = (await sitrep(coordinator)).body.sitrep;
    const { keyFigures } = await import('@/components/sitrep/figures');
    const mails = (await mailTo('coordinator@marrowbend.example')).filter((m) => m.subject.startsWith('Sitrep'));
    expect(mails).toHaveLength(1);
    for (const f of keyFigures(s)) expect(mails[0]!.text).toContain(`${f.label}: ${f.value}`);
    expect(mails[0]!.text).toContain(`/sitrep?outbreak=${DEMO_IDS.outbreak}`);
    expect(mails[0]!.html).toContain('Open the full sitrep');
    const { LedgerEntry } = await import('@/models');
    const row = (await LedgerEntry.findOne({ where: { kind: 'sitrep_sent' }, order: [['id', 'DESC']] }))!;
    const detail = JSON.parse(row.detail!);
    expect(detail.recipients).toEqual(['coordinator@marrowbend.example']);
    expect(detail.figures.cases).toBe(keyFigures(s).find((f) => f.key === 'cases')!.value);
    expect(row.outbreakId).toBe(DEMO_IDS.outbreak);
  });
});
