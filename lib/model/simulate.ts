/**
 * The driver: validates a ScenarioInput, splits the horizon at every switch (intervention start/end,
 * vaccination campaign start) and, for the fixed-step methods, at every whole day, and integrates each
 * constant-rate interval with the chosen method. dopri5 with daily records steps freely inside a
 * segment and emits whole days by its continuous extension. No step or stage straddles a switch: the step that would cross one is
 * shortened to end on it, and the next interval starts afresh from the switch.
 *
 * Step-safety policy (REFERENCES.md §5), checked before integrating, never by clamping:
 * - euler: refused (ModelError 'unsafe_step', field 'step') unless h · max(β·f + ν, γ, σ, ω) ≤ 1,
 *   with f the largest contact factor of the horizon. Since I ≤ N this bounds h·(βI/N + ν) ≤ 1, so no
 *   step can make a compartment negative, and γh ≤ 1 < 2 keeps the decay stable.
 * - rk4: refused unless h · max(β·f + ν, γ, σ, ω) < 2.785 (real-axis stability bound of RK4; its
 *   stability polynomial is positive on the real axis, so linear decay keeps its sign).
 * - dopri5: adaptive; fails with 'step_failure' if the tolerance cannot be met.
 * Any output with a compartment below −1e-9·N still gets a 'negative_compartment' warning.
 */
import { ModelError } from './errors';
import { DOPRI5_INTERVAL, Dopri5State, type AdaptiveInterval, type StepSink } from './dopri5';
import {
  eulerSEIR, eulerSIR, eulerSIRS, initPeak, rk4SEIR, rk4SIR, rk4SIRS,
  PK_LEN, PK_PENDING, P_BN, P_G, P_LEN, P_N, P_NU, P_OM, P_SIG, Y_C, Y_E, Y_I, Y_LEN, Y_R, Y_S, Y_V,
  type Kernel,
} from './kernels';
import { refinePeak, type Peak } from './peak';
import { scenarioInputSchema } from '../validation/scenario';
import type { ModelKind, Run, RunWarning, ScenarioInput } from './types';

/** RK4's stability interval on the negative real axis is (−2.7853, 0); keep a hair inside it. */
export const RK4_STABILITY = 2.785;

export const KERNELS: Record<'euler' | 'rk4', Record<ModelKind, Kernel>> = {
  euler: { SIR: eulerSIR, SEIR: eulerSEIR, SIRS: eulerSIRS },
  rk4: { SIR: rk4SIR, SEIR: rk4SEIR, SIRS: rk4SIRS },
};
const ADAPTIVE: Record<ModelKind, AdaptiveInterval> = DOPRI5_INTERVAL;

/** Validates untrusted input; throws ModelError('invalid_input') naming every failing field path. */
export function parseScenarioInput(raw: unknown): ScenarioInput {
  const res = scenarioInputSchema.safeParse(raw);
  if (res.success) return res.data;
  const fields: Record<string, string> = {};
  for (const issue of res.error.issues) {
    const path = issue.path.map(String).join('.') || '(root)';
    if (!(path in fields)) fields[path] = issue.message;
  }
  const [first] = Object.keys(fields);
  const field = first ?? '(root)';
  throw new ModelError('invalid_input', `${field}: ${fields[field] ?? 'invalid'}`, { field, fields });
}

/** Product of (1 − contactReduction) over the interventions active at t (start ≤ t < end), fraction. */
export function contactFactor(input: ScenarioInput, t: number): number {
  let f = 1;
  const list = input.interventions;
  if (list) {
    for (const iv of list) {
      if (t >= iv.startDay && (iv.endDay === undefined || t < iv.endDay)) f *= 1 - iv.contactReduction;
    }
  }
  return f;
}

/** Vaccination rate at t, per day (fraction of S per day). */
export function vaccinationRate(input: ScenarioInput, t: number): number {
  const v = input.vaccination;
  if (!v || !v.dailyRate) return 0;
  return t >= (v.startDay ?? 0) ? v.dailyRate : 0;
}

/** Sorted distinct switch times strictly inside (0, days). */
export function switchTimes(input: ScenarioInput): number[] {
  const s = new Set<number>();
  const add = (t: number | undefined) => {
    if (t !== undefined && t > 0 && t < input.days) s.add(t);
  };
  for (const iv of input.interventions ?? []) {
    add(iv.startDay);
    add(iv.endDay);
  }
  if (input.vaccination?.dailyRate) add(input.vaccination.startDay);
  return [...s].sort((a, b) => a - b);
}

/** The fastest per-capita outflow rate the scenario can reach, per day (for the step bounds). */
export function maxOutflowRate(input: ScenarioInput): number {
  let f = contactFactor(input, 0);
  let nu = vaccinationRate(input, 0);
  for (const t of switchTimes(input)) {
    f = Math.max(f, contactFactor(input, t));
    nu = Math.max(nu, vaccinationRate(input, t));
  }
  const { beta, gamma, sigma, omega } = input.params;
  let m = Math.max(beta * f + nu, gamma);
  if (input.model === 'SEIR') m = Math.max(m, sigma ?? 0);
  if (input.model === 'SIRS') m = Math.max(m, omega ?? 0);
  return m;
}

/** Largest fixed step the method accepts for this scenario, days (Infinity for dopri5). */
export function largestSafeStep(input: ScenarioInput): number {
  const m = maxOutflowRate(input);
  if (input.method === 'dopri5' || m === 0) return Infinity;
  return input.method === 'euler' ? 1 / m : RK4_STABILITY / m;
}

export function checkStep(input: ScenarioInput): void {
  const safe = largestSafeStep(input);
  if (input.step <= safe) return;
  const fmt = (x: number) => Number(x.toPrecision(4));
  const why =
    input.method === 'euler'
      ? 'forward Euler could make a compartment negative (it needs h·(β·I/N + ν) ≤ 1 and γh ≤ 1 at every step)'
      : 'RK4 would be unstable (it needs h × the fastest rate < 2.785)';
  throw new ModelError(
    'unsafe_step',
    `A step of ${input.step} day is unsafe for this scenario: ${why}. The largest safe step is ${fmt(safe)} day; use it, or a smaller one, or dopri5.`,
    { field: 'step', largestSafeStep: safe },
  );
}

// Module-local copies: when this file is transpiled to CommonJS (tsx), imported bindings become
// property reads on the other module's exports object, which the per-output path should not pay.
const iS = Y_S, iE = Y_E, iI = Y_I, iR = Y_R, iV = Y_V, iC = Y_C;
const pBN = P_BN, pNU = P_NU;

/** Growable output columns (people), one row per output time. */
class Recorder implements StepSink {
  len = 0;
  t: Float64Array;
  S: Float64Array;
  E: Float64Array;
  I: Float64Array;
  R: Float64Array;
  V: Float64Array;
  C: Float64Array;
  negative = false;
  constructor(
    cap: number,
    private readonly floor: number,
  ) {
    this.t = new Float64Array(cap);
    this.S = new Float64Array(cap);
    this.E = new Float64Array(cap);
    this.I = new Float64Array(cap);
    this.R = new Float64Array(cap);
    this.V = new Float64Array(cap);
    this.C = new Float64Array(cap);
  }
  private grow(): void {
    const cap = this.t.length * 2 + 16;
    const g = (a: Float64Array) => {
      const b = new Float64Array(cap);
      b.set(a);
      return b;
    };
    this.t = g(this.t);
    this.S = g(this.S);
    this.E = g(this.E);
    this.I = g(this.I);
    this.R = g(this.R);
    this.V = g(this.V);
    this.C = g(this.C);
  }
  push(t: number, y: Float64Array): void {
    if (this.len === this.t.length) this.grow();
    const k = this.len++;
    const S = y[iS] as number;
    const E = y[iE] as number;
    const I = y[iI] as number;
    const R = y[iR] as number;
    const V = y[iV] as number;
    this.t[k] = t;
    this.S[k] = S;
    this.E[k] = E;
    this.I[k] = I;
    this.R[k] = R;
    this.V[k] = V;
    this.C[k] = y[iC] as number;
    if (S < this.floor || E < this.floor || I < this.floor || R < this.floor || V < this.floor) this.negative = true;
  }
}

const trim = (a: Float64Array, n: number) => (a.length === n ? a : a.slice(0, n));

/** A Run together with the refined peak found on the integration steps. */
export interface SimulationResult {
  run: Run;
  peak: Peak;
}

/** Writes the state at t = 0 (people) into y: S = N − I − E − R, then the vaccinated-at-start share of S moved to V. */
export function initialStateInto(y: Float64Array, input: ScenarioInput): void {
  const N = input.population;
  const I0 = input.initial.I;
  const E0 = input.model === 'SEIR' ? (input.initial.E ?? 0) : 0;
  const R0 = input.initial.R ?? 0;
  const Sraw = Math.max(0, N - I0 - E0 - R0);
  const V0 = (input.vaccination?.atStart ?? 0) * Sraw;
  y[Y_S] = Sraw - V0;
  y[Y_E] = E0;
  y[Y_I] = I0;
  y[Y_R] = R0;
  y[Y_V] = V0;
  y[Y_C] = 0;
}

/** Constant-rate segments between switches: end (days), β/N (per person per day) and ν (per day) of each. */
export interface Segments {
  nSeg: number;
  segEnd: Float64Array;
  segBN: Float64Array;
  segNU: Float64Array;
}

/** The segments of `input` for its sorted switch times, rates computed once (at each midpoint). */
export function segmentsOf(input: ScenarioInput, switches: readonly number[]): Segments {
  const { population: N, days } = input;
  const beta = input.params.beta;
  const nSeg = switches.length + 1;
  const segEnd = new Float64Array(nSeg);
  const segBN = new Float64Array(nSeg);
  const segNU = new Float64Array(nSeg);
  for (let i = 0; i < nSeg; i++) {
    const a = i === 0 ? 0 : (switches[i - 1] as number);
    const b = i === nSeg - 1 ? days : (switches[i] as number);
    const mid = 0.5 * (a + b);
    segEnd[i] = b;
    segBN[i] = (beta * contactFactor(input, mid)) / N;
    segNU[i] = vaccinationRate(input, mid);
  }
  return { nSeg, segEnd, segBN, segNU };
}

/** Integrates an already validated input. */
export function simulateParsed(input: ScenarioInput): SimulationResult {
  checkStep(input);
  const { model, population: N, days, step: h, method } = input;
  const daily = (input.record ?? 'daily') === 'daily';
  const { gamma } = input.params;
  const sigma = input.params.sigma ?? 0;
  const omega = input.params.omega ?? 0;

  const y = new Float64Array(Y_LEN);
  initialStateInto(y, input);

  const switches = switchTimes(input);
  const cap = daily ? days + 1 : method === 'dopri5' ? 4 * days + 16 : Math.ceil(days / h) + days + 2 * switches.length + 2;
  const rec = new Recorder(cap, -1e-9 * N);
  rec.push(0, y);
  const pk = new Float64Array(PK_LEN);
  initPeak(pk, y);
  const p = new Float64Array(P_LEN);
  p[P_N] = N;
  p[P_G] = gamma;
  p[P_SIG] = sigma;
  p[P_OM] = omega;

  const kern = method === 'dopri5' ? null : KERNELS[method][model];
  const dp =
    method === 'dopri5' ? new Dopri5State(h, input.tolerance ?? 1e-8, input.tolerance ?? 1e-8) : null;
  const adaptive = ADAPTIVE[model];
  const sink = daily ? null : rec;
  const thr = 1e-9 * h;

  const { nSeg, segEnd, segBN, segNU } = segmentsOf(input, switches);

  let seg = 0;
  if (dp && daily) {
    // Whole segments with dense output: the steps need not stop at every day.
    dp.nextOut = 1;
    for (let i = 0; i < nSeg; i++) {
      p[pBN] = segBN[i] as number;
      p[pNU] = segNU[i] as number;
      adaptive(dp, y, p, i === 0 ? 0 : (segEnd[i - 1] as number), segEnd[i] as number, pk, null, rec);
    }
  }
  for (let d = 0; d < days && !(dp && daily); d++) {
    let a = d;
    const dayEnd = d + 1;
    while (a < dayEnd) {
      while (seg < nSeg - 1 && (segEnd[seg] as number) <= a) seg++;
      const se = segEnd[seg] as number;
      const b = se < dayEnd ? se : dayEnd;
      p[pBN] = segBN[seg] as number;
      p[pNU] = segNU[seg] as number;
      if (dp) {
        adaptive(dp, y, p, a, b, pk, sink, null);
      } else if (kern) {
        const L = b - a;
        const n = Math.floor(L / h + 1e-9);
        const r = L - n * h;
        const tail = r > thr;
        if (daily) {
          if (n > 0) kern(y, p, a, h, n, pk);
          if (tail) kern(y, p, a + n * h, r, 1, pk);
        } else {
          for (let k = 1; k <= n; k++) {
            kern(y, p, a + (k - 1) * h, h, 1, pk);
            rec.push(k === n && !tail ? b : a + k * h, y);
          }
          if (tail) {
            kern(y, p, a + n * h, r, 1, pk);
            rec.push(b, y);
          }
        }
      }
      a = b;
    }
    if (daily) rec.push(dayEnd, y);
  }

  const len = rec.len;
  const C = rec.C;
  const incidence = new Float64Array(len);
  for (let k = 1; k < len; k++) incidence[k] = (C[k] as number) - (C[k - 1] as number);
  const warnings: RunWarning[] = [];
  if (rec.negative) {
    warnings.push({
      code: 'negative_compartment',
      message: 'A compartment went below zero during the run (not clamped); use a smaller step or dopri5.',
    });
  }
  if (pk[PK_PENDING] === 1) {
    warnings.push({
      code: 'peak_at_horizon',
      message: `Infections are still rising on day ${days}: the peak lies beyond the horizon.`,
    });
  }
  const hasV = (input.vaccination?.atStart ?? 0) > 0 || (input.vaccination?.dailyRate ?? 0) > 0;
  const run: Run = {
    t: trim(rec.t, len),
    S: trim(rec.S, len),
    I: trim(rec.I, len),
    R: trim(rec.R, len),
    incidence,
    warnings,
  };
  if (model === 'SEIR') run.E = trim(rec.E, len);
  if (hasV) run.V = trim(rec.V, len);
  return { run, peak: refinePeak(pk, model, gamma, sigma) };
}

/** Peaks of the Runs made in this realm; a Run that crossed postMessage is recomputed in summarize. */
export const peakOfRun = new WeakMap<Run, Peak>();

/** Validates and integrates one Scenario. Throws ModelError on invalid input or an unsafe step. */
export function simulate(input: ScenarioInput): Run {
  const { run, peak } = simulateParsed(parseScenarioInput(input));
  peakOfRun.set(run, peak);
  return run;
}
