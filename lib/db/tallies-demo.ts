/**
 * Demo tallies for Marrow Bend (PRODUCT.md, "Demo data"): for each site, daily new cases from day 0
 * to yesterday, drawn from a small SIR wave per site with seeded Poisson noise, so the curve, the
 * fits and the completeness grid have something real-looking to show. Invented data; the demo only.
 */
import { randomUUID } from 'node:crypto';
import { Tally } from '@/models';
import { mulberry32, type Rng } from '@/lib/model/random';
import { addDays } from '@/lib/tallies/dates';
import { addDemoSeedHook } from './seed';
import { nextChangeSeq } from './counters';
import { DEMO_IDS, DEMO_SITES } from './demo';

/** Days of tallies: day 0 to day 23, the day before the seed (the seed's day 0 is 24 days back). */
const DAYS = 24;

/** Per site: contact rate β (per day), day the first cases arrive, and people infectious then. */
const WAVES: Record<(typeof DEMO_SITES)[number]['key'], { beta: number; lag: number; seedI: number }> = {
  alderCamp: { beta: 0.62, lag: 0, seedI: 4 },
  northgateSchool: { beta: 0.75, lag: 3, seedI: 2 },
  hollinCrossing: { beta: 0.5, lag: 5, seedI: 2 },
  lakeshoreWard: { beta: 0.55, lag: 2, seedI: 3 },
  fennelVillage: { beta: 0.52, lag: 6, seedI: 2 },
};
/** Recovery rate γ, per day (about 3 days infectious). */
const GAMMA = 1 / 3;

/** Site-days left without a tally so the completeness grid shows gaps (day numbers). */
const GAPS: Partial<Record<(typeof DEMO_SITES)[number]['key'], number[]>> = {
  northgateSchool: [9],
  fennelVillage: [15],
  hollinCrossing: [DAYS - 1],
};

/** A Poisson draw: Knuth's product method below 30, a rounded normal above (ample for a demo). */
function poisson(lambda: number, rng: Rng): number {
  if (lambda <= 0) return 0;
  if (lambda < 30) {
    const L = Math.exp(-lambda);
    let k = 0;
    let p = 1;
    do {
      k++;
      p *= rng();
    } while (p > L);
    return k - 1;
  }
  const u = Math.max(rng(), 1e-12);
  const z = Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng());
  return Math.max(0, Math.round(lambda + Math.sqrt(lambda) * z));
}

/** Expected new cases per day of an SIR wave (forward Euler, 20 steps a day), people per day. */
export function demoIncidence(population: number, beta: number, lag: number, seedI: number, days = DAYS): number[] {
  let S = population - seedI;
  let I = seedI;
  const out: number[] = [];
  const h = 1 / 20;
  for (let d = 0; d < days; d++) {
    if (d < lag) {
      out.push(0);
      continue;
    }
    let newCases = d === lag ? seedI : 0;
    for (let k = 0; k < 20; k++) {
      const inf = (beta * S * I) / population;
      S -= h * inf;
      I += h * (inf - GAMMA * I);
      newCases += h * inf;
    }
    out.push(newCases);
  }
  return out;
}

addDemoSeedHook(async ({ transaction: t, startDate, userIds }) => {
  const recorder = { teamNorth: userIds['field@marrowbend.example'] ?? null, teamLakeshore: userIds['field2@marrowbend.example'] ?? null };
  for (const [i, s] of DEMO_SITES.entries()) {
    const w = WAVES[s.key];
    const rng = mulberry32(0x7a11 + i * 977);
    const expected = demoIncidence(s.population, w.beta, w.lag, w.seedI);
    for (let d = 0; d < DAYS; d++) {
      if (GAPS[s.key]?.includes(d)) continue;
      const cases = poisson(expected[d]!, rng);
      const date = addDays(startDate, d);
      await Tally.create({
        id: randomUUID(), outbreakId: DEMO_IDS.outbreak, siteId: DEMO_IDS[s.key], date, newCases: cases,
        recoveries: d >= 3 ? poisson(expected[d - 3]! * 0.9, rng) : 0,
        deaths: 0, admissions: poisson(cases * 0.04, rng), note: null,
        version: 1, changeSeq: await nextChangeSeq(t), updatedBy: recorder[s.team], deviceId: null,
        recordedBy: recorder[s.team], recordedAt: new Date(`${date}T17:00:00Z`),
      }, { transaction: t });
    }
  }
});
