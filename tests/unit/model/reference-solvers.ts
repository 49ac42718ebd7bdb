/**
 * Independent references for the engine tests and benchmarks: the model equations written out again
 * here (not imported from lib/model), integrated by the general-purpose npm solvers
 *   ode-rk4 1.1.3 — fixed-step classical RK4, `rk4(y0, deriv(dydt, y, t), t0, dt)` then `.steps(n)`;
 *   odex 2.0.4    — Gragg–Bulirsch–Stoer extrapolation, `new Solver(n)`, `.solve(f(x, y) → y', x0, y0, x1)`.
 * Both are CommonJS without usable type declarations (odex ships a .ts source that fails our strict
 * settings), so they are loaded with createRequire and typed by the narrow interfaces below.
 * State layout: [S, E, I, R, V, C] (people; C = cumulative new infections).
 */
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

interface Rk4Integrator {
  y: Float64Array | number[];
  t: number;
  dt: number;
  deriv: (dydt: Float64Array | number[], y: Float64Array | number[], t: number) => void;
  step(): Rk4Integrator;
  steps(n: number): Rk4Integrator;
}
type Rk4Factory = (
  y0: Float64Array | number[],
  deriv: (dydt: Float64Array | number[], y: Float64Array | number[], t: number) => void,
  t0: number,
  dt: number,
) => Rk4Integrator;

interface OdexSolver {
  absoluteTolerance: number;
  relativeTolerance: number;
  maxSteps: number;
  initialStepSize: number;
  solve(
    f: (x: number, y: number[]) => number[],
    x0: number,
    y0: number[],
    x1: number,
  ): { y: number[]; outcome: number; nStep: number };
}
interface OdexModule {
  Solver: new (n: number) => OdexSolver;
  Outcome: { Converged: number };
}

export const rk4: Rk4Factory = require('ode-rk4') as Rk4Factory;
export const odex = require('odex') as OdexModule;

/** Rates of one constant-rate segment. */
export interface Rates {
  model: 'SIR' | 'SEIR' | 'SIRS';
  N: number;
  beta: number;
  gamma: number;
  sigma?: number;
  omega?: number;
  nu?: number;
}

/** dy/dt written from the equations in REFERENCES.md (plus V and the cumulative-infection counter C). */
export function derivative(r: Rates, y: ArrayLike<number>, out: { [i: number]: number }): void {
  const S = y[0] as number;
  const E = y[1] as number;
  const I = y[2] as number;
  const R = y[3] as number;
  const inf = (r.beta * S * I) / r.N;
  const vac = (r.nu ?? 0) * S;
  const wane = r.model === 'SIRS' ? (r.omega ?? 0) * R : 0;
  out[0] = -inf - vac + wane;
  if (r.model === 'SEIR') {
    const sig = (r.sigma ?? 0) * E;
    out[1] = inf - sig;
    out[2] = sig - r.gamma * I;
  } else {
    out[1] = 0;
    out[2] = inf - r.gamma * I;
  }
  out[3] = r.gamma * I - wane;
  out[4] = vac;
  out[5] = inf;
}

/** A piecewise-constant scenario: `ratesAt(t)` for t strictly inside a segment; `switches` its edges. */
export interface Piecewise {
  ratesAt: (t: number) => Rates;
  switches: number[];
}

/** odex at tolerance `tol`, restarted at every output time and switch; returns the state at each output. */
export function odexPiecewise(pw: Piecewise, y0: number[], outputs: number[], tol = 1e-12): number[][] {
  const solver = new odex.Solver(6);
  solver.absoluteTolerance = tol;
  solver.relativeTolerance = tol;
  solver.maxSteps = 100000;
  const cuts = [...new Set([...outputs, ...pw.switches])].sort((a, b) => a - b);
  let y = y0.slice();
  let t = 0;
  const res: number[][] = [];
  const wanted = new Set(outputs);
  if (wanted.has(0)) res.push(y.slice());
  for (const c of cuts) {
    if (c <= t) continue;
    const rates = pw.ratesAt(0.5 * (t + c));
    const f = (_x: number, yy: number[]) => {
      const out = [0, 0, 0, 0, 0, 0];
      derivative(rates, yy, out);
      return out;
    };
    const sol = solver.solve(f, t, y, c);
    if (sol.outcome !== odex.Outcome.Converged) throw new Error(`odex did not converge on [${t}, ${c}]`);
    y = sol.y;
    t = c;
    if (wanted.has(c)) res.push(y.slice());
  }
  return res;
}

/**
 * ode-rk4 at fixed step h from 0 to `days`, changing its `deriv` at each switch (switches must lie on
 * the step grid), returning the state at every whole day.
 */
export function rk4Piecewise(pw: Piecewise, y0: number[], h: number, days: number): number[][] {
  const cuts = [...new Set([...pw.switches.filter((s) => s > 0 && s < days), days])].sort((a, b) => a - b);
  const integ = rk4(Float64Array.from(y0), () => undefined, 0, h);
  const res: number[][] = [Array.from(integ.y)];
  let t = 0;
  for (const c of cuts) {
    const rates = pw.ratesAt(0.5 * (t + c));
    integ.deriv = (dydt, y) => derivative(rates, y, dydt);
    const perDay = Math.round(1 / h);
    for (let d = Math.round(t); d < Math.round(c); d++) {
      integ.steps(perDay);
      res.push(Array.from(integ.y));
    }
    t = c;
  }
  return res;
}

/** Plain-JSON scenario fields the references need (kept structural so no engine type is imported). */
export interface ScenarioLike {
  model: 'SIR' | 'SEIR' | 'SIRS';
  population: number;
  initial: { I: number; E?: number; R?: number };
  params: { beta: number; gamma: number; sigma?: number; omega?: number };
  vaccination?: { atStart?: number; dailyRate?: number; startDay?: number };
  interventions?: { startDay: number; endDay?: number; contactReduction: number }[];
  days: number;
}

/** The scenario as piecewise-constant rates, written independently of lib/model. */
export function piecewiseOf(s: ScenarioLike): Piecewise {
  const switches: number[] = [];
  for (const iv of s.interventions ?? []) {
    switches.push(iv.startDay);
    if (iv.endDay !== undefined) switches.push(iv.endDay);
  }
  if (s.vaccination?.startDay !== undefined) switches.push(s.vaccination.startDay);
  return {
    switches: switches.filter((x) => x > 0 && x < s.days),
    ratesAt: (t) => {
      let f = 1;
      for (const iv of s.interventions ?? []) {
        if (t >= iv.startDay && (iv.endDay === undefined || t < iv.endDay)) f *= 1 - iv.contactReduction;
      }
      const nu = s.vaccination?.dailyRate && t >= (s.vaccination.startDay ?? 0) ? s.vaccination.dailyRate : 0;
      const r: Rates = { model: s.model, N: s.population, beta: s.params.beta * f, gamma: s.params.gamma, nu };
      if (s.params.sigma !== undefined) r.sigma = s.params.sigma;
      if (s.params.omega !== undefined) r.omega = s.params.omega;
      return r;
    },
  };
}

/** [S, E, I, R, V, C] at t = 0. */
export function initialState(s: ScenarioLike): number[] {
  const E = s.initial.E ?? 0;
  const R = s.initial.R ?? 0;
  const S = s.population - s.initial.I - E - R;
  const V = (s.vaccination?.atStart ?? 0) * S;
  return [S - V, E, s.initial.I, R, V, 0];
}

/** Whole days 0..days. */
export const wholeDays = (days: number) => Array.from({ length: days + 1 }, (_, k) => k);
