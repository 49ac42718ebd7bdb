/** Scenarios shared by the engine tests (REFERENCES.md names the canonical one). */
import type { ScenarioInput } from '@/lib/model';

/** REFERENCES.md §4 canonical case: N = 1000, S0 = 999, I0 = 1, β = 0.5, γ = 0.25, T = 40. */
export const canonical: ScenarioInput = {
  model: 'SIR',
  population: 1000,
  initial: { I: 1 },
  params: { beta: 0.5, gamma: 0.25 },
  method: 'rk4',
  step: 1,
  days: 40,
};

export const seir: ScenarioInput = {
  model: 'SEIR',
  population: 10_000,
  initial: { I: 5, E: 10 },
  params: { beta: 0.5, gamma: 0.25, sigma: 0.2 },
  method: 'rk4',
  step: 0.1,
  days: 120,
};

export const sirs: ScenarioInput = {
  model: 'SIRS',
  population: 5000,
  initial: { I: 10, R: 100 },
  params: { beta: 0.6, gamma: 0.2, omega: 0.02 },
  method: 'rk4',
  step: 0.1,
  days: 200,
};

export const vaccinated: ScenarioInput = {
  model: 'SIR',
  population: 20_000,
  initial: { I: 20 },
  params: { beta: 0.45, gamma: 0.2 },
  vaccination: { atStart: 0.1, dailyRate: 0.01, startDay: 15 },
  method: 'rk4',
  step: 0.1,
  days: 150,
};

export const intervened: ScenarioInput = {
  model: 'SEIR',
  population: 50_000,
  initial: { I: 10, E: 20 },
  params: { beta: 0.6, gamma: 0.2, sigma: 0.25 },
  interventions: [
    { startDay: 20, endDay: 60, contactReduction: 0.4 },
    { startDay: 40, endDay: 50, contactReduction: 0.3 },
  ],
  method: 'rk4',
  step: 0.1,
  days: 150,
};

/** Max |a − b| over S, E, I, R (and V) of a run against reference states [S, E, I, R, V, C]. */
export function maxAbsError(
  run: { S: Float64Array; E?: Float64Array; I: Float64Array; R: Float64Array; V?: Float64Array; incidence: Float64Array },
  ref: number[][],
): number {
  let e = 0;
  for (let k = 0; k < ref.length; k++) {
    const r = ref[k] as number[];
    e = Math.max(e, Math.abs((run.S[k] as number) - (r[0] as number)));
    if (run.E) e = Math.max(e, Math.abs((run.E[k] as number) - (r[1] as number)));
    e = Math.max(e, Math.abs((run.I[k] as number) - (r[2] as number)));
    e = Math.max(e, Math.abs((run.R[k] as number) - (r[3] as number)));
    if (run.V) e = Math.max(e, Math.abs((run.V[k] as number) - (r[4] as number)));
    if (k > 0) {
      const inc = (r[5] as number) - ((ref[k - 1] as number[])[5] as number);
      e = Math.max(e, Math.abs((run.incidence[k] as number) - inc));
    }
  }
  return e;
}
