/**
 * Peak refinement between integration steps. The kernels keep the best step point (1) and its
 * neighbours (0 before, 2 after); here a cubic Hermite interpolant on each of the two intervals,
 * using I and dI/dt from the model at both ends, gives the maximum between the steps. Its error is
 * O(h⁴) in the step, below the RK4 error itself, while a parabola through daily samples would be O(1).
 */
import {
  PK_BEST, PK_BN1, PK_BN2, PK_E0, PK_E1, PK_E2, PK_HAS0, PK_HAS2, PK_I0, PK_I2, PK_S0, PK_S1, PK_S2, PK_T0,
  PK_T1, PK_T2,
} from './kernels';
import type { ModelKind } from './types';

export interface Peak {
  /** days */
  day: number;
  /** people */
  infectious: number;
}

/** dI/dt, people per day, at one state, with β/N = bN. */
function slope(kind: ModelKind, bN: number, gamma: number, sigma: number, S: number, E: number, I: number): number {
  return kind === 'SEIR' ? sigma * E - gamma * I : bN * S * I - gamma * I;
}

/** The cubic Hermite interpolant at s ∈ [0, 1] of an interval of length L. */
function hermiteValue(s: number, L: number, ya: number, ma: number, yb: number, mb: number): number {
  const s2 = s * s;
  const s3 = s2 * s;
  return (2 * s3 - 3 * s2 + 1) * ya + (s3 - 2 * s2 + s) * L * ma + (-2 * s3 + 3 * s2) * yb + (s3 - s2) * L * mb;
}

/** Maximum of the cubic Hermite interpolant on [ta, tb]; returns [t, value]. */
export function hermiteMax(ta: number, ya: number, ma: number, tb: number, yb: number, mb: number): [number, number] {
  const L = tb - ta;
  let bestS = ya >= yb ? 0 : 1;
  let bestV = Math.max(ya, yb);
  // p'(s) = A s² + B s + C
  const A = 6 * ya + 3 * L * ma - 6 * yb + 3 * L * mb;
  const B = -6 * ya - 4 * L * ma + 6 * yb - 2 * L * mb;
  const C = L * ma;
  // Up to two roots of p'; NaN marks "none" (it fails the (0, 1) test below).
  let r1 = NaN;
  let r2 = NaN;
  if (Math.abs(A) < 1e-14 * (Math.abs(B) + Math.abs(C) + 1e-300)) {
    if (B !== 0) r1 = -C / B;
  } else {
    const disc = B * B - 4 * A * C;
    if (disc >= 0) {
      // Stable quadratic roots (no cancellation).
      const q = -0.5 * (B + (B >= 0 ? 1 : -1) * Math.sqrt(disc));
      r1 = q / A;
      if (q !== 0) r2 = C / q;
    }
  }
  for (let i = 0; i < 2; i++) {
    const s = i === 0 ? r1 : r2;
    if (s > 0 && s < 1) {
      const v = hermiteValue(s, L, ya, ma, yb, mb);
      if (v > bestV) {
        bestV = v;
        bestS = s;
      }
    }
  }
  return [ta + bestS * L, bestV];
}

/** The refined peak from a kernel peak tracker. (No closures: this runs once per ensemble member.) */
export function refinePeak(pk: Float64Array, kind: ModelKind, gamma: number, sigma: number): Peak {
  let day = pk[PK_T1] as number;
  let infectious = pk[PK_BEST] as number;
  const I1 = infectious;
  if (pk[PK_HAS0] === 1) {
    const bN = pk[PK_BN1] as number;
    const I0 = pk[PK_I0] as number;
    const [t, v] = hermiteMax(
      pk[PK_T0] as number,
      I0,
      slope(kind, bN, gamma, sigma, pk[PK_S0] as number, pk[PK_E0] as number, I0),
      pk[PK_T1] as number,
      I1,
      slope(kind, bN, gamma, sigma, pk[PK_S1] as number, pk[PK_E1] as number, I1),
    );
    if (v > infectious) {
      infectious = v;
      day = t;
    }
  }
  if (pk[PK_HAS2] === 1) {
    const bN = pk[PK_BN2] as number;
    const I2 = pk[PK_I2] as number;
    const [t, v] = hermiteMax(
      pk[PK_T1] as number,
      I1,
      slope(kind, bN, gamma, sigma, pk[PK_S1] as number, pk[PK_E1] as number, I1),
      pk[PK_T2] as number,
      I2,
      slope(kind, bN, gamma, sigma, pk[PK_S2] as number, pk[PK_E2] as number, I2),
    );
    if (v > infectious) {
      infectious = v;
      day = t;
    }
  }
  return { day, infectious };
}
