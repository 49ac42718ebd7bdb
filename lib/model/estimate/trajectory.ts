/**
 * The fit's inner loop: the engine's own fixed-step kernels (lib/model/kernels.ts), driven day by day
 * exactly as simulate() drives them for a scenario without interventions or vaccination (floor(1/h)
 * steps of h, then a shorter tail step to end on the whole day), so a fitted trajectory equals
 * simulate()'s to round-off. Everything is preallocated: one evaluation allocates nothing.
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
