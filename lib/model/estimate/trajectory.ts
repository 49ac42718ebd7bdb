/**
 * The fit's inner loop: the engine's own fixed-step kernels (lib/model/kernels.ts), driven day by day
 * exactly as simulate() drives them for a scenario without interventions or vaccination (floor(1/h)
 * steps of h, then a shorter tail step to end on the whole day), so a fitted trajectory equals
 * simulate()'s to round-off. Everything is preallocated: one evaluation allocates nothing.
 *
 * For RK4, the hot path of every fit, the day loop and the steps are fused into one function per
 * model below (same arithmetic, in the same order, as kernels.ts, without the peak tracking the fit
 * does not need): a call per day and the tracker's stores cost about as much as the steps.
 */
import {
  eulerSEIR, eulerSIR, eulerSIRS, initPeak, rk4SEIR, rk4SIR, rk4SIRS,
  PK_LEN, P_BN, P_G, P_LEN, P_N, P_NU, P_OM, P_SIG, Y_C, Y_E, Y_I, Y_LEN, Y_R, Y_S, Y_V,
  type Kernel,
} from '../kernels';
import { RK4_STABILITY } from '../simulate';
import type { ModelKind } from '../types';

export type FixedStepMethod = 'euler' | 'rk4';

const KERNELS: Record<FixedStepMethod, Record<ModelKind, Kernel>> = {
  euler: { SIR: eulerSIR, SEIR: eulerSEIR, SIRS: eulerSIRS },
  rk4: { SIR: rk4SIR, SEIR: rk4SEIR, SIRS: rk4SIRS },
};

/** Rates and seed of one evaluation. */
export interface TrajectoryParams {
  /** per day */
  beta: number;
  /** per day */
  gamma: number;
  /** per day (SEIR) */
  sigma: number;
  /** per day (SIRS) */
  omega: number;
  /** Initial infectious, people. */
  I0: number;
}

export class TrajectoryEvaluator {
  private readonly y = new Float64Array(Y_LEN);
  private readonly p = new Float64Array(P_LEN);
  private readonly pk = new Float64Array(PK_LEN);
  private readonly kern: Kernel;
  private readonly n: number;
  private readonly tail: number;
  private readonly stability: number;

  constructor(
    readonly model: ModelKind,
    /** people */
    readonly population: number,
    /** Initial exposed (SEIR), people. */
    readonly E0: number,
    /** Initial removed, people. */
    readonly R0: number,
    readonly method: FixedStepMethod,
    /** days */
    readonly step: number,
  ) {
    this.kern = KERNELS[method][model];
    this.n = Math.floor(1 / step + 1e-9);
    const r = 1 - this.n * step;
    this.tail = r > 1e-9 * step ? r : 0;
    this.stability = method === 'euler' ? 1 : RK4_STABILITY;
  }

  /** True when simulate() would accept this step for these rates (its step-safety policy). */
  stepIsSafe(q: TrajectoryParams): boolean {
    let m = Math.max(q.beta, q.gamma);
    if (this.model === 'SEIR') m = Math.max(m, q.sigma);
    if (this.model === 'SIRS') m = Math.max(m, q.omega);
    return m === 0 || this.step <= this.stability / m;
  }

  /**
   * Integrate to `lastDay` and write, for every whole day d = 0..lastDay, the prevalence I(d) into
   * `prevalence[d]` and the new infections of (d−1, d] into `incidence[d]` (incidence[0] = 0), when
   * those arrays are given. Returns false when the step is unsafe, S0 < 0, or a compartment goes below
   * −1e-9·N (the caller treats such parameters as infeasible).
   */
  run(q: TrajectoryParams, lastDay: number, prevalence: Float64Array | null, incidence: Float64Array | null): boolean {
    const N = this.population;
    const S0 = N - q.I0 - this.E0 - this.R0;
    if (!(S0 >= 0) || !(q.I0 >= 0) || !this.stepIsSafe(q)) return false;
    const y = this.y;
    const p = this.p;
    const pk = this.pk;
    y[Y_S] = S0;
    y[Y_E] = this.model === 'SEIR' ? this.E0 : 0;
    y[Y_I] = q.I0;
    y[Y_R] = this.R0;
    y[Y_V] = 0;
    y[Y_C] = 0;
    initPeak(pk, y);
    p[P_N] = N;
    p[P_BN] = q.beta / N;
    p[P_G] = q.gamma;
    p[P_SIG] = q.sigma;
    p[P_OM] = q.omega;
    p[P_NU] = 0;
    if (prevalence) prevalence[0] = q.I0;
    if (incidence) incidence[0] = 0;
    const floor = -1e-9 * N;
    if (this.method === 'rk4') {
      const f = this.model === 'SIR' ? fusedRk4SIR : this.model === 'SEIR' ? fusedRk4SEIR : fusedRk4SIRS;
      return f(y, N, q, this.step, this.n, this.tail, lastDay, floor, prevalence, incidence);
    }
    const h = this.step;
    const n = this.n;
    const tail = this.tail;
    const kern = this.kern;
    let cPrev = 0;
    for (let d = 0; d < lastDay; d++) {
      kern(y, p, d, h, n, pk);
      if (tail > 0) kern(y, p, d + n * h, tail, 1, pk);
      const S = y[Y_S]!;
      const I = y[Y_I]!;
      if (!(S >= floor) || !(I >= floor) || !(y[Y_E]! >= floor)) return false;
      if (prevalence) prevalence[d + 1] = I;
      if (incidence) {
        const c = y[Y_C]!;
        incidence[d + 1] = c - cPrev;
        cPrev = c;
      }
    }
    return true;
  }
}

type Fused = (
  y: Float64Array,
  N: number,
  q: TrajectoryParams,
  h: number,
  n: number,
  tail: number,
  lastDay: number,
  floor: number,
  prevalence: Float64Array | null,
  incidence: Float64Array | null,
) => boolean;

const fusedRk4SIR: Fused = (y, N, q, h0, n, tail, lastDay, floor, prevalence, incidence) => {
  const bN = q.beta / N;
  const g = q.gamma;
  let S = y[Y_S]!;
  let I = y[Y_I]!;
  let C = 0;
  let cPrev = 0;
  const steps = tail > 0 ? n + 1 : n;
  for (let d = 0; d < lastDay; d++) {
    for (let j = 0; j < steps; j++) {
      const h = j < n ? h0 : tail;
      const h2 = 0.5 * h;
      const h6 = h / 6;
      const a1 = bN * S * I;
      const dS1 = -a1;
      const dI1 = a1 - g * I;
      const S2 = S + h2 * dS1;
      const I2 = I + h2 * dI1;
      const a2 = bN * S2 * I2;
      const dS2 = -a2;
      const dI2 = a2 - g * I2;
      const S3 = S + h2 * dS2;
      const I3 = I + h2 * dI2;
      const a3 = bN * S3 * I3;
      const dS3 = -a3;
      const dI3 = a3 - g * I3;
      const S4 = S + h * dS3;
      const I4 = I + h * dI3;
      const a4 = bN * S4 * I4;
      const dS4 = -a4;
      const dI4 = a4 - g * I4;
      S = S + h6 * (dS1 + 2 * dS2 + 2 * dS3 + dS4);
      I = I + h6 * (dI1 + 2 * dI2 + 2 * dI3 + dI4);
      C += h6 * (a1 + 2 * a2 + 2 * a3 + a4);
    }
    if (!(S >= floor) || !(I >= floor)) return false;
    if (prevalence) prevalence[d + 1] = I;
    if (incidence) {
      incidence[d + 1] = C - cPrev;
      cPrev = C;
    }
  }
  return true;
};

const fusedRk4SEIR: Fused = (y, N, q, h0, n, tail, lastDay, floor, prevalence, incidence) => {
  const bN = q.beta / N;
  const g = q.gamma;
  const sg = q.sigma;
  let S = y[Y_S]!;
  let E = y[Y_E]!;
  let I = y[Y_I]!;
  let C = 0;
  let cPrev = 0;
  const steps = tail > 0 ? n + 1 : n;
  for (let d = 0; d < lastDay; d++) {
    for (let j = 0; j < steps; j++) {
      const h = j < n ? h0 : tail;
      const h2 = 0.5 * h;
      const h6 = h / 6;
      const a1 = bN * S * I;
      const dS1 = -a1;
      const dE1 = a1 - sg * E;
      const dI1 = sg * E - g * I;
      const S2 = S + h2 * dS1;
      const E2 = E + h2 * dE1;
      const I2 = I + h2 * dI1;
      const a2 = bN * S2 * I2;
      const dS2 = -a2;
      const dE2 = a2 - sg * E2;
      const dI2 = sg * E2 - g * I2;
      const S3 = S + h2 * dS2;
      const E3 = E + h2 * dE2;
      const I3 = I + h2 * dI2;
      const a3 = bN * S3 * I3;
      const dS3 = -a3;
      const dE3 = a3 - sg * E3;
      const dI3 = sg * E3 - g * I3;
      const S4 = S + h * dS3;
      const E4 = E + h * dE3;
      const I4 = I + h * dI3;
      const a4 = bN * S4 * I4;
      const dS4 = -a4;
      const dE4 = a4 - sg * E4;
      const dI4 = sg * E4 - g * I4;
      S = S + h6 * (dS1 + 2 * dS2 + 2 * dS3 + dS4);
      E = E + h6 * (dE1 + 2 * dE2 + 2 * dE3 + dE4);
      I = I + h6 * (dI1 + 2 * dI2 + 2 * dI3 + dI4);
      C += h6 * (a1 + 2 * a2 + 2 * a3 + a4);
    }
    if (!(S >= floor) || !(I >= floor) || !(E >= floor)) return false;
    if (prevalence) prevalence[d + 1] = I;
    if (incidence) {
      incidence[d + 1] = C - cPrev;
      cPrev = C;
    }
  }
  return true;
};

const fusedRk4SIRS: Fused = (y, N, q, h0, n, tail, lastDay, floor, prevalence, incidence) => {
  const bN = q.beta / N;
  const g = q.gamma;
  const om = q.omega;
  let S = y[Y_S]!;
  let I = y[Y_I]!;
  let R = y[Y_R]!;
  let C = 0;
  let cPrev = 0;
  const steps = tail > 0 ? n + 1 : n;
  for (let d = 0; d < lastDay; d++) {
    for (let j = 0; j < steps; j++) {
      const h = j < n ? h0 : tail;
      const h2 = 0.5 * h;
      const h6 = h / 6;
      const a1 = bN * S * I;
      const dS1 = -a1 + om * R;
      const dI1 = a1 - g * I;
      const dR1 = g * I - om * R;
      const S2 = S + h2 * dS1;
      const I2 = I + h2 * dI1;
      const R2 = R + h2 * dR1;
      const a2 = bN * S2 * I2;
      const dS2 = -a2 + om * R2;
      const dI2 = a2 - g * I2;
      const dR2 = g * I2 - om * R2;
      const S3 = S + h2 * dS2;
      const I3 = I + h2 * dI2;
      const R3 = R + h2 * dR2;
      const a3 = bN * S3 * I3;
      const dS3 = -a3 + om * R3;
      const dI3 = a3 - g * I3;
      const dR3 = g * I3 - om * R3;
      const S4 = S + h * dS3;
      const I4 = I + h * dI3;
      const R4 = R + h * dR3;
      const a4 = bN * S4 * I4;
      const dS4 = -a4 + om * R4;
      const dI4 = a4 - g * I4;
      const dR4 = g * I4 - om * R4;
      S = S + h6 * (dS1 + 2 * dS2 + 2 * dS3 + dS4);
      I = I + h6 * (dI1 + 2 * dI2 + 2 * dI3 + dI4);
      C += h6 * (a1 + 2 * a2 + 2 * a3 + a4);
      R += h6 * (dR1 + 2 * dR2 + 2 * dR3 + dR4);
    }
    if (!(S >= floor) || !(I >= floor) || !(R >= floor)) return false;
    if (prevalence) prevalence[d + 1] = I;
    if (incidence) {
      incidence[d + 1] = C - cPrev;
      cPrev = C;
    }
  }
  return true;
};
