/**
 * Dormand–Prince 5(4) with local-extrapolation (the 5th-order solution is kept), FSAL inside an
 * interval, and the usual elementary step-size control (Hairer, Nørsett & Wanner, Solving ODEs I,
 * §II.4–5). The driver calls `dopri5Interval` once per constant-rate interval, landing exactly on its
 * end, so no stage ever straddles a switch and whole-day outputs need no interpolation.
 *
 * `dopri5Interval` is the generic form over the whole state vector with a right-hand-side callback.
 * The driver uses `DOPRI5_INTERVAL[model]` instead: the same method written out per model on scalar
 * locals (no stage arrays, no callback, no stage states for compartments the rates never read). Every
 * value is computed by the same expression in the same order as the generic form, so both give
 * bit-identical runs (tests/unit/model/fast-paths.test.ts checks it); the generic form stays as the
 * readable statement of the method and as that test's reference.
 */
import { ModelError } from './errors';
import { MAX_STEPS } from '../validation/scenario';
import { trackPeak, Y_C, Y_E, Y_I, Y_LEN, Y_R, Y_S, Y_V, P_BN, P_G, P_NU, P_OM, P_SIG, type Rhs } from './kernels';

// Module-local copies: transpiled to CommonJS (tsx), an imported binding is a getter call per use.
const nY = Y_LEN, iS = Y_S, iE = Y_E, iI = Y_I, iR = Y_R, iV = Y_V, iC = Y_C;
const pBN = P_BN, pG = P_G, pNU = P_NU, pOM = P_OM, pSIG = P_SIG;
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

/** One constant-rate interval of the adaptive method for one model (see DOPRI5_INTERVAL). */
export type AdaptiveInterval = (
  st: Dopri5State,
  y: Float64Array,
  p: Float64Array,
  a: number,
  b: number,
  pk: Float64Array,
  sink: StepSink | null,
  dense: StepSink | null,
) => void;

/** Squared scaled error of one component (the generic loop's summand). */
function errTerm(
  y0: number, y1: number, k1: number, k3: number, k4: number, k5: number, k6: number, k7: number,
  h: number, atol: number, rtol: number,
): number {
  const e = h * (E1 * k1 + E3 * k3 + E4 * k4 + E5 * k5 + E6 * k6 + E7 * k7);
  const sc = atol + rtol * Math.max(Math.abs(y0), Math.abs(y1));
  return (e / sc) * (e / sc);
}

/** Continuous extension of one component at θ = th (th1 = 1 − θ). */
function denseAt(
  y0: number, y1: number, k1: number, k3: number, k4: number, k5: number, k6: number, k7: number,
  h: number, th: number, th1: number,
): number {
  const r2 = y1 - y0;
  const r3 = h * k1 - r2;
  const r4 = r2 - h * k7 - r3;
  const r5 = h * (D1 * k1 + D3 * k3 + D4 * k4 + D5 * k5 + D6 * k6 + D7 * k7);
  return y0 + th * (r2 + th1 * (r3 + th * (r4 + th1 * r5)));
}

/** The generic loop's guards on a step about to be tried (too small, too many). */
function guardStep(st: Dopri5State, h: number, t: number): void {
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
}

const errFactor = (err: number) =>
  err === 0 ? FAC_MAX : Math.min(FAC_MAX, Math.max(FAC_MIN, SAFETY * Math.pow(err, -0.2)));

export const dopri5SIR: AdaptiveInterval = (st, y, p, a, b, pk, sink, dense) => {
  const { yn, yd, rtol, atol } = st;
  const bN = p[pBN] as number;
  const g = p[pG] as number;
  const nu = p[pNU] as number;
  let S = y[iS] as number;
  let I = y[iI] as number;
  let R = y[iR] as number;
  let V = y[iV] as number;
  let C = y[iC] as number;
  let t = a;
  let q = bN * S * I;
  let u = nu * S;
  let r = g * I;
  let k1S = -q - u, k1I = q - r, k1R = r, k1V = u, k1C = q;
  for (;;) {
    const left = b - t;
    if (left <= 1e-13 * Math.max(1, Math.abs(b))) break;
    let h = st.h;
    let last = false;
    if (h >= left * (1 - 1e-12)) {
      h = left;
      last = true;
    }
    guardStep(st, h, t);
    let wS = S + h * A21 * k1S;
    let wI = I + h * A21 * k1I;
    q = bN * wS * wI; u = nu * wS; r = g * wI;
    const k2S = -q - u, k2I = q - r;
    wS = S + h * (A31 * k1S + A32 * k2S);
    wI = I + h * (A31 * k1I + A32 * k2I);
    q = bN * wS * wI; u = nu * wS; r = g * wI;
    const k3S = -q - u, k3I = q - r, k3R = r, k3V = u, k3C = q;
    wS = S + h * (A41 * k1S + A42 * k2S + A43 * k3S);
    wI = I + h * (A41 * k1I + A42 * k2I + A43 * k3I);
    q = bN * wS * wI; u = nu * wS; r = g * wI;
    const k4S = -q - u, k4I = q - r, k4R = r, k4V = u, k4C = q;
    wS = S + h * (A51 * k1S + A52 * k2S + A53 * k3S + A54 * k4S);
    wI = I + h * (A51 * k1I + A52 * k2I + A53 * k3I + A54 * k4I);
    q = bN * wS * wI; u = nu * wS; r = g * wI;
    const k5S = -q - u, k5I = q - r, k5R = r, k5V = u, k5C = q;
    wS = S + h * (A61 * k1S + A62 * k2S + A63 * k3S + A64 * k4S + A65 * k5S);
    wI = I + h * (A61 * k1I + A62 * k2I + A63 * k3I + A64 * k4I + A65 * k5I);
    q = bN * wS * wI; u = nu * wS; r = g * wI;
    const k6S = -q - u, k6I = q - r, k6R = r, k6V = u, k6C = q;
    const Sn = S + h * (B1 * k1S + B3 * k3S + B4 * k4S + B5 * k5S + B6 * k6S);
    const In = I + h * (B1 * k1I + B3 * k3I + B4 * k4I + B5 * k5I + B6 * k6I);
    const Rn = R + h * (B1 * k1R + B3 * k3R + B4 * k4R + B5 * k5R + B6 * k6R);
    const Vn = V + h * (B1 * k1V + B3 * k3V + B4 * k4V + B5 * k5V + B6 * k6V);
    const Cn = C + h * (B1 * k1C + B3 * k3C + B4 * k4C + B5 * k5C + B6 * k6C);
    q = bN * Sn * In; u = nu * Sn; r = g * In;
    const k7S = -q - u, k7I = q - r, k7R = r, k7V = u, k7C = q;
    // E ≡ 0 for SIR adds exactly 0 to the generic sum, so it is left out.
    let err = errTerm(S, Sn, k1S, k3S, k4S, k5S, k6S, k7S, h, atol, rtol);
    err += errTerm(I, In, k1I, k3I, k4I, k5I, k6I, k7I, h, atol, rtol);
    err += errTerm(R, Rn, k1R, k3R, k4R, k5R, k6R, k7R, h, atol, rtol);
    err += errTerm(V, Vn, k1V, k3V, k4V, k5V, k6V, k7V, h, atol, rtol);
    err += errTerm(C, Cn, k1C, k3C, k4C, k5C, k6C, k7C, h, atol, rtol);
    err = Math.sqrt(err / nY);
    const fac = errFactor(err);
    if (err <= 1) {
      const tn = last ? b : t + h;
      track(pk, bN, t, S, 0, I, tn, Sn, 0, In);
      if (dense) {
        const slack = 1e-9 * h;
        while (st.nextOut <= tn + slack) {
          const td = st.nextOut;
          const out = Math.abs(td - tn) <= slack ? yn : yd;
          if (out === yn) {
            yn[iS] = Sn; yn[iE] = 0; yn[iI] = In; yn[iR] = Rn; yn[iV] = Vn; yn[iC] = Cn;
          } else {
            const th = (td - t) / h;
            const th1 = 1 - th;
            yd[iS] = denseAt(S, Sn, k1S, k3S, k4S, k5S, k6S, k7S, h, th, th1);
            yd[iE] = 0;
            yd[iI] = denseAt(I, In, k1I, k3I, k4I, k5I, k6I, k7I, h, th, th1);
            yd[iR] = denseAt(R, Rn, k1R, k3R, k4R, k5R, k6R, k7R, h, th, th1);
            yd[iV] = denseAt(V, Vn, k1V, k3V, k4V, k5V, k6V, k7V, h, th, th1);
            yd[iC] = denseAt(C, Cn, k1C, k3C, k4C, k5C, k6C, k7C, h, th, th1);
          }
          dense.push(td, out);
          st.nextOut = td + 1;
        }
      }
      S = Sn; I = In; R = Rn; V = Vn; C = Cn;
      k1S = k7S; k1I = k7I; k1R = k7R; k1V = k7V; k1C = k7C;
      t = tn;
      st.accepted++;
      if (sink) {
        y[iS] = S; y[iI] = I; y[iR] = R; y[iV] = V; y[iC] = C;
        sink.push(t, y);
      }
      // A shortened last step says nothing about the step the error allows: keep the longer proposal.
      const proposal = h * fac;
      st.h = last ? Math.max(st.h, proposal) : proposal;
      if (last) break;
    } else {
      st.h = h * Math.min(1, fac);
    }
  }
  y[iS] = S; y[iI] = I; y[iR] = R; y[iV] = V; y[iC] = C;
};

export const dopri5SEIR: AdaptiveInterval = (st, y, p, a, b, pk, sink, dense) => {
  const { yn, yd, rtol, atol } = st;
  const bN = p[pBN] as number;
  const g = p[pG] as number;
  const sg = p[pSIG] as number;
  const nu = p[pNU] as number;
  let S = y[iS] as number;
  let E = y[iE] as number;
  let I = y[iI] as number;
  let R = y[iR] as number;
  let V = y[iV] as number;
  let C = y[iC] as number;
  let t = a;
  let q = bN * S * I;
  let u = nu * S;
  let l = sg * E;
  let r = g * I;
  let k1S = -q - u, k1E = q - l, k1I = l - r, k1R = r, k1V = u, k1C = q;
  for (;;) {
    const left = b - t;
    if (left <= 1e-13 * Math.max(1, Math.abs(b))) break;
    let h = st.h;
    let last = false;
    if (h >= left * (1 - 1e-12)) {
      h = left;
      last = true;
    }
    guardStep(st, h, t);
    let wS = S + h * A21 * k1S;
    let wE = E + h * A21 * k1E;
    let wI = I + h * A21 * k1I;
    q = bN * wS * wI; u = nu * wS; l = sg * wE; r = g * wI;
    const k2S = -q - u, k2E = q - l, k2I = l - r;
    wS = S + h * (A31 * k1S + A32 * k2S);
    wE = E + h * (A31 * k1E + A32 * k2E);
    wI = I + h * (A31 * k1I + A32 * k2I);
    q = bN * wS * wI; u = nu * wS; l = sg * wE; r = g * wI;
    const k3S = -q - u, k3E = q - l, k3I = l - r, k3R = r, k3V = u, k3C = q;
    wS = S + h * (A41 * k1S + A42 * k2S + A43 * k3S);
    wE = E + h * (A41 * k1E + A42 * k2E + A43 * k3E);
    wI = I + h * (A41 * k1I + A42 * k2I + A43 * k3I);
    q = bN * wS * wI; u = nu * wS; l = sg * wE; r = g * wI;
    const k4S = -q - u, k4E = q - l, k4I = l - r, k4R = r, k4V = u, k4C = q;
    wS = S + h * (A51 * k1S + A52 * k2S + A53 * k3S + A54 * k4S);
    wE = E + h * (A51 * k1E + A52 * k2E + A53 * k3E + A54 * k4E);
    wI = I + h * (A51 * k1I + A52 * k2I + A53 * k3I + A54 * k4I);
    q = bN * wS * wI; u = nu * wS; l = sg * wE; r = g * wI;
    const k5S = -q - u, k5E = q - l, k5I = l - r, k5R = r, k5V = u, k5C = q;
    wS = S + h * (A61 * k1S + A62 * k2S + A63 * k3S + A64 * k4S + A65 * k5S);
    wE = E + h * (A61 * k1E + A62 * k2E + A63 * k3E + A64 * k4E + A65 * k5E);
    wI = I + h * (A61 * k1I + A62 * k2I + A63 * k3I + A64 * k4I + A65 * k5I);
    q = bN * wS * wI; u = nu * wS; l = sg * wE; r = g * wI;
    const k6S = -q - u, k6E = q - l, k6I = l - r, k6R = r, k6V = u, k6C = q;
    const Sn = S + h * (B1 * k1S + B3 * k3S + B4 * k4S + B5 * k5S + B6 * k6S);
    const En = E + h * (B1 * k1E + B3 * k3E + B4 * k4E + B5 * k5E + B6 * k6E);
    const In = I + h * (B1 * k1I + B3 * k3I + B4 * k4I + B5 * k5I + B6 * k6I);
    const Rn = R + h * (B1 * k1R + B3 * k3R + B4 * k4R + B5 * k5R + B6 * k6R);
    const Vn = V + h * (B1 * k1V + B3 * k3V + B4 * k4V + B5 * k5V + B6 * k6V);
    const Cn = C + h * (B1 * k1C + B3 * k3C + B4 * k4C + B5 * k5C + B6 * k6C);
    q = bN * Sn * In; u = nu * Sn; l = sg * En; r = g * In;
    const k7S = -q - u, k7E = q - l, k7I = l - r, k7R = r, k7V = u, k7C = q;
    let err = errTerm(S, Sn, k1S, k3S, k4S, k5S, k6S, k7S, h, atol, rtol);
    err += errTerm(E, En, k1E, k3E, k4E, k5E, k6E, k7E, h, atol, rtol);
    err += errTerm(I, In, k1I, k3I, k4I, k5I, k6I, k7I, h, atol, rtol);
    err += errTerm(R, Rn, k1R, k3R, k4R, k5R, k6R, k7R, h, atol, rtol);
    err += errTerm(V, Vn, k1V, k3V, k4V, k5V, k6V, k7V, h, atol, rtol);
    err += errTerm(C, Cn, k1C, k3C, k4C, k5C, k6C, k7C, h, atol, rtol);
    err = Math.sqrt(err / nY);
    const fac = errFactor(err);
    if (err <= 1) {
      const tn = last ? b : t + h;
      track(pk, bN, t, S, E, I, tn, Sn, En, In);
      if (dense) {
        const slack = 1e-9 * h;
        while (st.nextOut <= tn + slack) {
          const td = st.nextOut;
          const out = Math.abs(td - tn) <= slack ? yn : yd;
          if (out === yn) {
            yn[iS] = Sn; yn[iE] = En; yn[iI] = In; yn[iR] = Rn; yn[iV] = Vn; yn[iC] = Cn;
          } else {
            const th = (td - t) / h;
            const th1 = 1 - th;
            yd[iS] = denseAt(S, Sn, k1S, k3S, k4S, k5S, k6S, k7S, h, th, th1);
            yd[iE] = denseAt(E, En, k1E, k3E, k4E, k5E, k6E, k7E, h, th, th1);
            yd[iI] = denseAt(I, In, k1I, k3I, k4I, k5I, k6I, k7I, h, th, th1);
            yd[iR] = denseAt(R, Rn, k1R, k3R, k4R, k5R, k6R, k7R, h, th, th1);
            yd[iV] = denseAt(V, Vn, k1V, k3V, k4V, k5V, k6V, k7V, h, th, th1);
            yd[iC] = denseAt(C, Cn, k1C, k3C, k4C, k5C, k6C, k7C, h, th, th1);
          }
          dense.push(td, out);
          st.nextOut = td + 1;
        }
      }
      S = Sn; E = En; I = In; R = Rn; V = Vn; C = Cn;
      k1S = k7S; k1E = k7E; k1I = k7I; k1R = k7R; k1V = k7V; k1C = k7C;
      t = tn;
      st.accepted++;
      if (sink) {
        y[iS] = S; y[iE] = E; y[iI] = I; y[iR] = R; y[iV] = V; y[iC] = C;
        sink.push(t, y);
      }
      const proposal = h * fac;
      st.h = last ? Math.max(st.h, proposal) : proposal;
      if (last) break;
    } else {
      st.h = h * Math.min(1, fac);
    }
  }
  y[iS] = S; y[iE] = E; y[iI] = I; y[iR] = R; y[iV] = V; y[iC] = C;
};

export const dopri5SIRS: AdaptiveInterval = (st, y, p, a, b, pk, sink, dense) => {
  const { yn, yd, rtol, atol } = st;
  const bN = p[pBN] as number;
  const g = p[pG] as number;
  const om = p[pOM] as number;
  const nu = p[pNU] as number;
  let S = y[iS] as number;
  let I = y[iI] as number;
  let R = y[iR] as number;
  let V = y[iV] as number;
  let C = y[iC] as number;
  let t = a;
  let q = bN * S * I;
  let u = nu * S;
  let r = g * I;
  let w = om * R;
  let k1S = -q - u + w, k1I = q - r, k1R = r - w, k1V = u, k1C = q;
  for (;;) {
    const left = b - t;
    if (left <= 1e-13 * Math.max(1, Math.abs(b))) break;
    let h = st.h;
    let last = false;
    if (h >= left * (1 - 1e-12)) {
      h = left;
      last = true;
    }
    guardStep(st, h, t);
    let wS = S + h * A21 * k1S;
    let wI = I + h * A21 * k1I;
    let wR = R + h * A21 * k1R;
    q = bN * wS * wI; u = nu * wS; r = g * wI; w = om * wR;
    const k2S = -q - u + w, k2I = q - r, k2R = r - w;
    wS = S + h * (A31 * k1S + A32 * k2S);
    wI = I + h * (A31 * k1I + A32 * k2I);
    wR = R + h * (A31 * k1R + A32 * k2R);
    q = bN * wS * wI; u = nu * wS; r = g * wI; w = om * wR;
    const k3S = -q - u + w, k3I = q - r, k3R = r - w, k3V = u, k3C = q;
    wS = S + h * (A41 * k1S + A42 * k2S + A43 * k3S);
    wI = I + h * (A41 * k1I + A42 * k2I + A43 * k3I);
    wR = R + h * (A41 * k1R + A42 * k2R + A43 * k3R);
    q = bN * wS * wI; u = nu * wS; r = g * wI; w = om * wR;
    const k4S = -q - u + w, k4I = q - r, k4R = r - w, k4V = u, k4C = q;
    wS = S + h * (A51 * k1S + A52 * k2S + A53 * k3S + A54 * k4S);
    wI = I + h * (A51 * k1I + A52 * k2I + A53 * k3I + A54 * k4I);
    wR = R + h * (A51 * k1R + A52 * k2R + A53 * k3R + A54 * k4R);
    q = bN * wS * wI; u = nu * wS; r = g * wI; w = om * wR;
    const k5S = -q - u + w, k5I = q - r, k5R = r - w, k5V = u, k5C = q;
    wS = S + h * (A61 * k1S + A62 * k2S + A63 * k3S + A64 * k4S + A65 * k5S);
    wI = I + h * (A61 * k1I + A62 * k2I + A63 * k3I + A64 * k4I + A65 * k5I);
    wR = R + h * (A61 * k1R + A62 * k2R + A63 * k3R + A64 * k4R + A65 * k5R);
    q = bN * wS * wI; u = nu * wS; r = g * wI; w = om * wR;
    const k6S = -q - u + w, k6I = q - r, k6R = r - w, k6V = u, k6C = q;
    const Sn = S + h * (B1 * k1S + B3 * k3S + B4 * k4S + B5 * k5S + B6 * k6S);
    const In = I + h * (B1 * k1I + B3 * k3I + B4 * k4I + B5 * k5I + B6 * k6I);
    const Rn = R + h * (B1 * k1R + B3 * k3R + B4 * k4R + B5 * k5R + B6 * k6R);
    const Vn = V + h * (B1 * k1V + B3 * k3V + B4 * k4V + B5 * k5V + B6 * k6V);
    const Cn = C + h * (B1 * k1C + B3 * k3C + B4 * k4C + B5 * k5C + B6 * k6C);
    q = bN * Sn * In; u = nu * Sn; r = g * In; w = om * Rn;
    const k7S = -q - u + w, k7I = q - r, k7R = r - w, k7V = u, k7C = q;
    // E ≡ 0 for SIRS adds exactly 0 to the generic sum, so it is left out.
    let err = errTerm(S, Sn, k1S, k3S, k4S, k5S, k6S, k7S, h, atol, rtol);
    err += errTerm(I, In, k1I, k3I, k4I, k5I, k6I, k7I, h, atol, rtol);
    err += errTerm(R, Rn, k1R, k3R, k4R, k5R, k6R, k7R, h, atol, rtol);
    err += errTerm(V, Vn, k1V, k3V, k4V, k5V, k6V, k7V, h, atol, rtol);
    err += errTerm(C, Cn, k1C, k3C, k4C, k5C, k6C, k7C, h, atol, rtol);
    err = Math.sqrt(err / nY);
    const fac = errFactor(err);
    if (err <= 1) {
      const tn = last ? b : t + h;
      track(pk, bN, t, S, 0, I, tn, Sn, 0, In);
      if (dense) {
        const slack = 1e-9 * h;
        while (st.nextOut <= tn + slack) {
          const td = st.nextOut;
          const out = Math.abs(td - tn) <= slack ? yn : yd;
          if (out === yn) {
            yn[iS] = Sn; yn[iE] = 0; yn[iI] = In; yn[iR] = Rn; yn[iV] = Vn; yn[iC] = Cn;
          } else {
            const th = (td - t) / h;
            const th1 = 1 - th;
            yd[iS] = denseAt(S, Sn, k1S, k3S, k4S, k5S, k6S, k7S, h, th, th1);
            yd[iE] = 0;
            yd[iI] = denseAt(I, In, k1I, k3I, k4I, k5I, k6I, k7I, h, th, th1);
            yd[iR] = denseAt(R, Rn, k1R, k3R, k4R, k5R, k6R, k7R, h, th, th1);
            yd[iV] = denseAt(V, Vn, k1V, k3V, k4V, k5V, k6V, k7V, h, th, th1);
            yd[iC] = denseAt(C, Cn, k1C, k3C, k4C, k5C, k6C, k7C, h, th, th1);
          }
          dense.push(td, out);
          st.nextOut = td + 1;
        }
      }
      S = Sn; I = In; R = Rn; V = Vn; C = Cn;
      k1S = k7S; k1I = k7I; k1R = k7R; k1V = k7V; k1C = k7C;
      t = tn;
      st.accepted++;
      if (sink) {
        y[iS] = S; y[iI] = I; y[iR] = R; y[iV] = V; y[iC] = C;
        sink.push(t, y);
      }
      const proposal = h * fac;
      st.h = last ? Math.max(st.h, proposal) : proposal;
      if (last) break;
    } else {
      st.h = h * Math.min(1, fac);
    }
  }
  y[iS] = S; y[iI] = I; y[iR] = R; y[iV] = V; y[iC] = C;
};

/** The specialised adaptive interval of each model. */
export const DOPRI5_INTERVAL = { SIR: dopri5SIR, SEIR: dopri5SEIR, SIRS: dopri5SIRS } as const;
