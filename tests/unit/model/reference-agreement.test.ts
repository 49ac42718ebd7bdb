/**
 * Agreement with general-purpose solvers (REFERENCES.md §7): ode-rk4 1.1.3 at the same step must match
 * the engine's RK4 to round-off; odex 2.0.4 at tolerance 1e-12 is the high-accuracy reference.
 */
import { describe, expect, it } from 'vitest';
import { simulate, type ScenarioInput } from '@/lib/model';
import { canonical, intervened, maxAbsError, seir, sirs, vaccinated } from './cases';
import { initialState, odexPiecewise, piecewiseOf, rk4Piecewise, wholeDays } from './reference-solvers';

const cases: [string, ScenarioInput][] = [
  ['SIR', { ...canonical, step: 0.1 }],
  ['SEIR', seir],
  ['SIRS', sirs],
  ['SIR with vaccination', vaccinated],
  ['SEIR with two overlapping interventions', intervened],
];

describe('engine RK4 vs ode-rk4 at the same step [calc: ode-rk4 1.1.3, REFERENCES §7]', () => {
  for (const [label, input] of cases) {
    it(`${label}: equal to round-off`, () => {
      const run = simulate(input);
      const ref = rk4Piecewise(piecewiseOf(input), initialState(input), input.step, input.days);
      expect(ref.length).toBe(run.t.length);
      // Round-off: measured ≤ 4e-16·N; the bound leaves room for other engines' rounding.
      expect(maxAbsError(run, ref)).toBeLessThan(1e-12 * input.population);
    });
  }
});

describe('engine vs odex 2.0.4 at tolerance 1e-12 [calc: odex, REFERENCES §7]', () => {
  for (const [label, input] of cases) {
    it(`${label}: RK4 h = 0.02 within 1e-9·N`, () => {
      const run = simulate({ ...input, step: 0.02 });
      const ref = odexPiecewise(piecewiseOf(input), initialState(input), wholeDays(input.days));
      // RK4 global error at h = 0.02 is ~(0.02/0.125)^4 × 1.46e-6 ≈ 1e-9 on the canonical case.
      expect(maxAbsError(run, ref)).toBeLessThan(1e-9 * input.population);
    });
    for (const tol of [1e-6, 1e-8, 1e-10]) {
      it(`${label}: dopri5 at tolerance ${tol} within 3·tol·N`, () => {
        const run = simulate({ ...input, method: 'dopri5', step: 0.5, tolerance: tol });
        const ref = odexPiecewise(piecewiseOf(input), initialState(input), wholeDays(input.days));
        const err = maxAbsError(run, ref);
        // Local error control does not bound the global error by tol; measured ≤ 1.3·tol·N here.
        expect(err).toBeLessThan(3 * tol * input.population);
      });
    }
  }

  it('the odex reference reproduces the canonical RK4 h = 1e-4 values [calc: REFERENCES §4]', () => {
    const ref = odexPiecewise(piecewiseOf(canonical), initialState(canonical), [40]);
    const y = ref[0] as number[];
    expect(y[0]).toBeCloseTo(246.474189076, 7);
    expect(y[2]).toBeCloseTo(53.777060785, 7);
    expect(y[3]).toBeCloseTo(699.748750139, 7);
  });
});

describe('switching exactly at a non-grid day [calc: odex piecewise]', () => {
  const base: ScenarioInput = {
    ...canonical,
    days: 60,
    interventions: [{ startDay: 10.3, endDay: 31.7, contactReduction: 0.5 }],
  };
  const ref = odexPiecewise(piecewiseOf(base), initialState(base), wholeDays(60));

  it('rk4 step 1: the steps end on 10.3 and 31.7 (record "step")', () => {
    const run = simulate({ ...base, record: 'step' });
    const times = Array.from(run.t);
    expect(times).toContain(10.3);
    expect(times).toContain(31.7);
    const i = times.indexOf(10.3);
    expect(times.slice(i - 1, i + 2)).toEqual([10, 10.3, 11]);
  });

  it('rk4 step 1 matches odex to RK4 accuracy, far closer than a switch moved to a grid day', () => {
    const err = maxAbsError(simulate(base), ref);
    expect(err).toBeLessThan(0.05);
    const moved = { ...base, interventions: [{ startDay: 10, endDay: 32, contactReduction: 0.5 }] };
    const errMoved = maxAbsError(simulate(moved), ref);
    expect(errMoved).toBeGreaterThan(100 * err);
  });

  it('rk4 step 0.25 (10.3 off the grid) keeps 4th-order accuracy against odex', () => {
    const e1 = maxAbsError(simulate({ ...base, step: 0.25 }), ref);
    const e2 = maxAbsError(simulate({ ...base, step: 0.125 }), ref);
    expect(e1).toBeLessThan(1e-3);
    expect(Math.log2(e1 / e2)).toBeGreaterThan(3.7);
  });

  it('dopri5 with a first step of 1 day matches odex to its tolerance', () => {
    const err = maxAbsError(simulate({ ...base, method: 'dopri5', tolerance: 1e-10 }), ref);
    expect(err).toBeLessThan(1e-6);
  });
});
