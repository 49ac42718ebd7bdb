/**
 * Dormand–Prince 5(4) with local-extrapolation (the 5th-order solution is kept), FSAL inside an
 * interval, and the usual elementary step-size control (Hairer, Nørsett & Wanner, Solving ODEs I,
 * §II.4–5). The driver calls `dopri5Interval` once per constant-rate interval, landing exactly on its
 * end, so no stage ever straddles a switch and whole-day outputs need no interpolation.
 */
import { ModelError } from './errors';
import { MAX_STEPS } from '../validation/scenario';
import { trackPeak, Y_E, Y_I, Y_LEN, Y_S, P_BN, type Rhs } from './kernels';

// Module-local copies: transpiled to CommonJS (tsx), an imported binding is a getter call per use.
const nY = Y_LEN, iS = Y_S, iE = Y_E, iI = Y_I, pBN = P_BN;
const track = trackPeak;

const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
const B1 = 35 / 384, B3 = 500 / 1113, B4 = 125 / 192, B5 = -2187 / 6784, B6 = 11 / 84;
// Difference between the 5th- and the embedded 4th-order weights.
const E1 = 71 / 57600, E3 = -71 / 16695, E4 = 71 / 1920, E5 = -17253 / 339200, E6 = 22 / 525, E7 = -1 / 40;

// Continuous extension (Hairer, Nørsett & Wanner I, §II.6; the coefficients of their DOPRI5 code):
// 4th-order dense output from the stages of an accepted step, for whole-day records between steps.
const D1 = -12715105075 / 11282082432, D3 = 87487479700 / 32700410799, D4 = -10690763975 / 1880347072;
const D5 = 701980252875 / 199316789632, D6 = -1453857185 / 822651844, D7 = 69997945 / 29380423;

const SAFETY = 0.9;
const FAC_MIN = 0.2;
const FAC_MAX = 10;

/** Scratch and step-size memory of one adaptive run; allocated once. */
export class Dopri5State {
  readonly k1 = new Float64Array(Y_LEN);
  readonly k2 = new Float64Array(Y_LEN);
  readonly k3 = new Float64Array(Y_LEN);
  readonly k4 = new Float64Array(Y_LEN);
  readonly k5 = new Float64Array(Y_LEN);
  readonly k6 = new Float64Array(Y_LEN);
  readonly k7 = new Float64Array(Y_LEN);
  readonly w = new Float64Array(Y_LEN);
  readonly yn = new Float64Array(Y_LEN);
  readonly yd = new Float64Array(Y_LEN);
  /** Next whole day to emit by dense output, days. */
  nextOut = 1;
  /** Proposed next step, days. */
  h: number;
  /** Accepted + rejected steps so far. */
  steps = 0;
  accepted = 0;
  constructor(
    firstStep: number,
    /** Relative tolerance, fraction. */
    readonly rtol: number,
    /** Absolute tolerance, people. */
    readonly atol: number,
  ) {
    this.h = firstStep;
  }
}

/** Called after every accepted step (record 'step'). */
export interface StepSink {
  push(t: number, y: Float64Array): void;
}

/**
 * Advances y in place from a to b (days) with the rates p held constant. `sink` receives every
 * accepted step; `dense` receives every whole day st.nextOut, st.nextOut + 1, … ≤ b, interpolated
 * inside a step by the continuous extension (exact step values when a day ends a step).
 */
export function dopri5Interval(
  st: Dopri5State,
  rhs: Rhs,
  y: Float64Array,
  p: Float64Array,
  a: number,
  b: number,
  pk: Float64Array,
  sink: StepSink | null,
  dense: StepSink | null = null,
): void {
  const { k1, k2, k3, k4, k5, k6, k7, w, yn, yd, rtol, atol } = st;
  const n = nY;
  const bN = p[pBN] as number;
  let t = a;
  rhs(k1, y, p);
  for (;;) {
    const left = b - t;
    if (left <= 1e-13 * Math.max(1, Math.abs(b))) break;
    let h = st.h;
    let last = false;
    if (h >= left * (1 - 1e-12)) {
      h = left;
      last = true;
    }
    if (h <= 1e-14 * Math.max(1, Math.abs(t))) {
      throw new ModelError('step_failure', `dopri5: the step fell to ${h} day at day ${t}; tolerance too tight`, {
        field: 'tolerance',
      });
    }
    if (++st.steps > MAX_STEPS) {
      throw new ModelError('step_failure', `dopri5 needed more than ${MAX_STEPS} steps; loosen the tolerance`, {
        field: 'tolerance',
      });
    }
    for (let i = 0; i < n; i++) w[i] = (y[i] as number) + h * A21 * (k1[i] as number);
    rhs(k2, w, p);
    for (let i = 0; i < n; i++) w[i] = (y[i] as number) + h * (A31 * (k1[i] as number) + A32 * (k2[i] as number));
    rhs(k3, w, p);
    for (let i = 0; i < n; i++)
      w[i] = (y[i] as number) + h * (A41 * (k1[i] as number) + A42 * (k2[i] as number) + A43 * (k3[i] as number));
    rhs(k4, w, p);
    for (let i = 0; i < n; i++)
      w[i] =
        (y[i] as number) +
        h * (A51 * (k1[i] as number) + A52 * (k2[i] as number) + A53 * (k3[i] as number) + A54 * (k4[i] as number));
    rhs(k5, w, p);
    for (let i = 0; i < n; i++)
      w[i] =
        (y[i] as number) +
        h *
          (A61 * (k1[i] as number) +
            A62 * (k2[i] as number) +
            A63 * (k3[i] as number) +
            A64 * (k4[i] as number) +
            A65 * (k5[i] as number));
    rhs(k6, w, p);
    for (let i = 0; i < n; i++)
      yn[i] =
        (y[i] as number) +
        h *
          (B1 * (k1[i] as number) +
            B3 * (k3[i] as number) +
            B4 * (k4[i] as number) +
            B5 * (k5[i] as number) +
            B6 * (k6[i] as number));
    rhs(k7, yn, p);
    let err = 0;
    for (let i = 0; i < n; i++) {
      const e =
        h *
        (E1 * (k1[i] as number) +
          E3 * (k3[i] as number) +
          E4 * (k4[i] as number) +
          E5 * (k5[i] as number) +
          E6 * (k6[i] as number) +
          E7 * (k7[i] as number));
      const sc = atol + rtol * Math.max(Math.abs(y[i] as number), Math.abs(yn[i] as number));
      err += (e / sc) * (e / sc);
    }
    err = Math.sqrt(err / n);
    const fac = err === 0 ? FAC_MAX : Math.min(FAC_MAX, Math.max(FAC_MIN, SAFETY * Math.pow(err, -0.2)));
    if (err <= 1) {
      const tn = last ? b : t + h;
      track(pk, bN, t, y[iS] as number, y[iE] as number, y[iI] as number, tn, yn[iS] as number, yn[iE] as number, yn[iI] as number);
      if (dense) {
        const slack = 1e-9 * h;
        while (st.nextOut <= tn + slack) {
          const td = st.nextOut;
          if (Math.abs(td - tn) <= slack) {
            dense.push(td, yn);
          } else {
            const th = (td - t) / h;
            const th1 = 1 - th;
            for (let i = 0; i < n; i++) {
              const y0 = y[i] as number;
              const r2 = (yn[i] as number) - y0;
              const r3 = h * (k1[i] as number) - r2;
              const r4 = r2 - h * (k7[i] as number) - r3;
              const r5 =
                h *
                (D1 * (k1[i] as number) +
                  D3 * (k3[i] as number) +
                  D4 * (k4[i] as number) +
                  D5 * (k5[i] as number) +
                  D6 * (k6[i] as number) +
                  D7 * (k7[i] as number));
              yd[i] = y0 + th * (r2 + th1 * (r3 + th * (r4 + th1 * r5)));
            }
            dense.push(td, yd);
          }
          st.nextOut = td + 1;
        }
      }
      y.set(yn);
      k1.set(k7);
      t = tn;
      st.accepted++;
      if (sink) sink.push(t, y);
      // A shortened last step says nothing about the step the error allows: keep the longer proposal.
      const proposal = h * fac;
      st.h = last ? Math.max(st.h, proposal) : proposal;
      if (last) break;
    } else {
      st.h = h * Math.min(1, fac);
    }
  }
}
