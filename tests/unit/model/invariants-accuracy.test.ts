/** REFERENCES.md §4: invariants, convergence order, the exact decay solution, fixed-step values. */
import { describe, expect, it } from 'vitest';
import { simulate, type Run, type ScenarioInput } from '@/lib/model';
import { canonical, intervened, seir, sirs, vaccinated } from './cases';

/** [calc] REFERENCES §4: canonical case at T = 40 by RK4 with h = 1e-4. */
const REF40 = { S: 246.474189076, I: 53.777060785, R: 699.748750139 };

function errAt40(run: Run): number {
  const k = run.t.length - 1;
  expect(run.t[k]).toBe(40);
  return Math.max(
    Math.abs((run.S[k] as number) - REF40.S),
    Math.abs((run.I[k] as number) - REF40.I),
    Math.abs((run.R[k] as number) - REF40.R),
  );
}

describe('conservation S + E + I + R + V = N [mem: Hairer, Lubich & Wanner, GNI — RK methods keep linear invariants]', () => {
  const cases: [string, ScenarioInput][] = [
    ['SIR', canonical],
    ['SEIR', seir],
    ['SIRS', sirs],
    ['vaccination', vaccinated],
    ['interventions', intervened],
  ];
  for (const [label, input] of cases) {
    for (const method of ['euler', 'rk4', 'dopri5'] as const) {
      for (const record of ['daily', 'step'] as const) {
        it(`${label}, ${method}, record ${record}: drift ≤ 1e-12·N at every output`, () => {
          const step = method === 'euler' ? 0.05 : input.step;
          const run = simulate({ ...input, method, step, record });
          const N = input.population;
          let drift = 0;
          for (let k = 0; k < run.t.length; k++) {
            const sum =
              (run.S[k] as number) + (run.E?.[k] ?? 0) + (run.I[k] as number) + (run.R[k] as number) + (run.V?.[k] ?? 0);
            drift = Math.max(drift, Math.abs(sum - N));
          }
          expect(drift).toBeLessThanOrEqual(1e-12 * N);
          expect(run.t.length).toBeGreaterThan(input.days);
        });
      }
    }
  }
});

describe('convergence order on the canonical case [mem: Hairer, Nørsett & Wanner I; calc: REFERENCES §4 values]', () => {
  it('forward Euler: errors 6.125, 2.920, 1.427, 0.7055 and order 1', () => {
    const hs = [0.5, 0.25, 0.125, 0.0625];
    const listed = [6.125, 2.92, 1.427, 0.7055];
    const errs = hs.map((h) => errAt40(simulate({ ...canonical, method: 'euler', step: h })));
    // Listed to 4 significant figures.
    errs.forEach((e, i) => expect(Math.abs(e - (listed[i] as number)) / (listed[i] as number)).toBeLessThan(5e-4));
    for (let i = 1; i < errs.length; i++) {
      expect(errs[i] as number).toBeGreaterThan(1e-10);
      const order = Math.log2((errs[i - 1] as number) / (errs[i] as number));
      expect(order).toBeGreaterThanOrEqual(0.9);
      expect(order).toBeLessThanOrEqual(1.1);
    }
  });

  it('RK4: errors 5.12e-3, 3.49e-4, 2.28e-5, 1.46e-6 and order 4', () => {
    const hs = [1, 0.5, 0.25, 0.125];
    const listed = [5.12e-3, 3.49e-4, 2.28e-5, 1.46e-6];
    const errs = hs.map((h) => errAt40(simulate({ ...canonical, method: 'rk4', step: h })));
    // Listed to 3 significant figures; the reference itself is given to 1e-9.
    errs.forEach((e, i) => expect(Math.abs(e - (listed[i] as number)) / (listed[i] as number)).toBeLessThan(0.01));
    for (let i = 1; i < errs.length; i++) {
      expect(errs[i] as number).toBeGreaterThan(1e-10);
      const order = Math.log2((errs[i - 1] as number) / (errs[i] as number));
      expect(order).toBeGreaterThanOrEqual(3.7);
      expect(order).toBeLessThanOrEqual(4.2);
    }
  });
});

describe('H = I + S − (N/R0)·ln S drift [calc: REFERENCES §4]', () => {
  const drift = (run: Run) => {
    const H = (k: number) => (run.I[k] as number) + (run.S[k] as number) - (1000 / 2) * Math.log(run.S[k] as number);
    let d = 0;
    for (let k = 0; k < run.t.length; k++) d = Math.max(d, Math.abs(H(k) - H(0)));
    return d;
  };
  it('shrinks about 2× per halving of h for Euler', () => {
    const d = [0.5, 0.25, 0.125, 0.0625].map((h) => drift(simulate({ ...canonical, method: 'euler', step: h })));
    for (let i = 1; i < d.length; i++) {
      const ratio = (d[i - 1] as number) / (d[i] as number);
      expect(ratio).toBeGreaterThan(1.9);
      expect(ratio).toBeLessThan(2.1);
    }
  });
  it('shrinks about 16× per halving of h for RK4', () => {
    const d = [1, 0.5, 0.25, 0.125].map((h) => drift(simulate({ ...canonical, method: 'rk4', step: h })));
    for (let i = 1; i < d.length; i++) {
      const ratio = (d[i - 1] as number) / (d[i] as number);
      expect(ratio).toBeGreaterThan(15);
      expect(ratio).toBeLessThan(17);
    }
  });
  it('is near zero for dopri5 at a tight tolerance (the exact solution keeps H)', () => {
    expect(drift(simulate({ ...canonical, method: 'dopri5', tolerance: 1e-11 }))).toBeLessThan(1e-7);
  });
});

describe('exact solution with β = 0: I(t) = I0·e^(−γt) [calc: REFERENCES §4]', () => {
  const input: ScenarioInput = {
    model: 'SIR',
    population: 1000,
    initial: { I: 100 },
    params: { beta: 0, gamma: 0.25 },
    method: 'rk4',
    step: 0.01,
    days: 8,
  };
  it('I(8) = 13.5335283237', () => {
    for (const [method, step, tol] of [
      ['rk4', 0.01, 1e-9],
      ['dopri5', 0.1, 1e-6],
      ['euler', 0.0001, 5e-3],
    ] as const) {
      const run = simulate({ ...input, method, step, tolerance: 1e-10 });
      expect(Math.abs((run.I[8] as number) - 13.5335283237)).toBeLessThan(tol);
      expect(100 * Math.exp(-0.25 * 8)).toBeCloseTo(13.5335283237, 10);
    }
  });
  it('no new infections: incidence stays 0 and S stays 900', () => {
    const run = simulate(input);
    expect(Math.max(...run.incidence)).toBe(0);
    expect(run.S[8]).toBe(900);
  });
});

describe('fixed-step values at day 10, canonical case [calc: REFERENCES §4]', () => {
  it('Euler h = 1: [982.654659, 9.106149, 8.239192]', () => {
    const run = simulate({ ...canonical, method: 'euler', step: 1, days: 10 });
    expect(run.S[10]).toBeCloseTo(982.654659, 6);
    expect(run.I[10]).toBeCloseTo(9.106149, 6);
    expect(run.R[10]).toBeCloseTo(8.239192, 6);
  });
  it('RK4 h = 1: [977.310874, 11.714125, 10.975001]', () => {
    const run = simulate({ ...canonical, method: 'rk4', step: 1, days: 10 });
    expect(run.S[10]).toBeCloseTo(977.310874, 6);
    expect(run.I[10]).toBeCloseTo(11.714125, 6);
    expect(run.R[10]).toBeCloseTo(10.975001, 6);
  });
});

describe('records', () => {
  it('daily records whole days 0..days; step records every step, ending exactly on the horizon', () => {
    const daily = simulate({ ...canonical, step: 0.3 });
    expect(Array.from(daily.t)).toEqual(Array.from({ length: 41 }, (_, k) => k));
    const steps = simulate({ ...canonical, step: 0.3, record: 'step' });
    // 0.3, 0.6, 0.9, then the step shortened to land on the whole day 1.
    expect(Array.from(steps.t.slice(0, 5)).map((x) => Number(x.toFixed(12)))).toEqual([0, 0.3, 0.6, 0.9, 1]);
    expect(steps.t[steps.t.length - 1]).toBe(40);
    // Same steps either way: the daily record is a subset of the step record.
    const at = Array.from(steps.t).indexOf(40);
    expect(steps.I[at]).toBe(daily.I[40]);
  });
  it('incidence sums to the fall in S + V-free compartments (SIR: S0 − S(T))', () => {
    const run = simulate({ ...canonical, step: 0.1 });
    let sum = 0;
    for (const x of run.incidence) sum += x;
    expect(sum).toBeCloseTo((run.S[0] as number) - (run.S[40] as number), 9);
  });
});
