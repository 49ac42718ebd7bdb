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

/** Maximum of the cubic Hermite interpolant on [ta, tb]; returns [t, value]. */
export function hermiteMax(ta: number, ya: number, ma: number, tb: number, yb: number, mb: number): [number, number] {
  const L = tb - ta;
  const value = (s: number) => {
    const s2 = s * s;
    const s3 = s2 * s;
    return (2 * s3 - 3 * s2 + 1) * ya + (s3 - 2 * s2 + s) * L * ma + (-2 * s3 + 3 * s2) * yb + (s3 - s2) * L * mb;
  };
  let bestS = ya >= yb ? 0 : 1;
  let bestV = Math.max(ya, yb);
  // p'(s) = A s² + B s + C
  const A = 6 * ya + 3 * L * ma - 6 * yb + 3 * L * mb;
  const B = -6 * ya - 4 * L * ma + 6 * yb - 2 * L * mb;
  const C = L * ma;
  const roots: number[] = [];
  if (Math.abs(A) < 1e-14 * (Math.abs(B) + Math.abs(C) + 1e-300)) {
    if (B !== 0) roots.push(-C / B);
  } else {
    const disc = B * B - 4 * A * C;
    if (disc >= 0) {
      // Stable quadratic roots (no cancellation).
      const q = -0.5 * (B + (B >= 0 ? 1 : -1) * Math.sqrt(disc));
      roots.push(q / A);
      if (q !== 0) roots.push(C / q);
    }
  }
  for (const s of roots) {
    if (s > 0 && s < 1) {
      const v = value(s);
      if (v > bestV) {
        bestV = v;
        bestS = s;
      }
    }
  }
  return [ta + bestS * L, bestV];
}

/** The refined peak from a kernel peak tracker. */
export function refinePeak(pk: Float64Array, kind: ModelKind, gamma: number, sigma: number): Peak {
  const g = (i: number) => pk[i] as number;
  let day = g(PK_T1);
  let infectious = g(PK_BEST);
  const I1 = infectious;
  if (g(PK_HAS0) === 1) {
    const bN = g(PK_BN1);
    const [t, v] = hermiteMax(
      g(PK_T0),
      g(PK_I0),
      slope(kind, bN, gamma, sigma, g(PK_S0), g(PK_E0), g(PK_I0)),
      g(PK_T1),
      I1,
      slope(kind, bN, gamma, sigma, g(PK_S1), g(PK_E1), I1),
    );
    if (v > infectious) {
      infectious = v;
      day = t;
    }
  }
  if (g(PK_HAS2) === 1) {
    const bN = g(PK_BN2);
    const [t, v] = hermiteMax(
      g(PK_T1),
      I1,
      slope(kind, bN, gamma, sigma, g(PK_S1), g(PK_E1), I1),
      g(PK_T2),
      g(PK_I2),
      slope(kind, bN, gamma, sigma, g(PK_S2), g(PK_E2), g(PK_I2)),
    );
    if (v > infectious) {
      infectious = v;
      day = t;
    }
  }
  return { day, infectious };
}
