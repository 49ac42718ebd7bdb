/**
 * Two-lane RK4 kernels for ensembles: two members of one ensemble advanced in the same loop.
 *
 * One RK4 step of these models is a chain of dependent multiply–adds, so a single run leaves most of
 * the CPU's floating-point units idle waiting on the previous result; interleaving two independent
 * runs fills those slots. Each function is its kernels.ts kernel written out twice (lane A, lane B,
 * statements alternated, every local renamed per lane), trimmed to what an ensemble reads:
 * - no vaccination term: the caller uses these only on pieces where both lanes have ν = 0, where the
 *   kernels.ts terms −ν·S and V += h/6·ν·(…) add exact zeros, so S, E, I, C and the peak tracker come
 *   out bit-identical to simulate()'s (tests/unit/model/fast-paths.test.ts checks it); V is left as is
 *   (constant when ν = 0);
 * - SIR and SEIR do not update R (nothing an ensemble reports reads it, and R does not feed back), so
 *   y[Y_R] is stale after them. SIRS keeps R: waning feeds it back into S.
 * The lanes share t0, h and n: the caller pairs only members with the same switch times.
 * Change these together with kernels.ts (the bit-equality test fails if they drift apart).
 */
import * as K from './kernels';

// Module-local copies: transpiled to CommonJS (tsx), an imported binding is a getter call per use.
const {
  PK_BEST, PK_BN1, PK_BN2, PK_E0, PK_E1, PK_E2, PK_HAS0, PK_HAS2, PK_I0, PK_I2, PK_PENDING, PK_S0, PK_S1, PK_S2,
  PK_T0, PK_T1, PK_T2, P_BN, P_G, P_OM, P_SIG, Y_C, Y_E, Y_I, Y_R, Y_S,
} = K;

export type Kernel2 = (
  yA: Float64Array,
  pA: Float64Array,
  pkA: Float64Array,
  yB: Float64Array,
  pB: Float64Array,
  pkB: Float64Array,
  t0: number,
  h: number,
  n: number,
) => void;

export const rk4SIR2: Kernel2 = (yA, pA, pkA, yB, pB, pkB, t0, h, n) => {
  const bNA = pA[P_BN] as number;
  const gA = pA[P_G] as number;
  let SA = yA[Y_S] as number;
  let IA = yA[Y_I] as number;
  let CA = yA[Y_C] as number;
  let bestA = pkA[PK_BEST] as number;
  let pendingA = pkA[PK_PENDING] === 1;
  const bNB = pB[P_BN] as number;
  const gB = pB[P_G] as number;
  let SB = yB[Y_S] as number;
  let IB = yB[Y_I] as number;
  let CB = yB[Y_C] as number;
  let bestB = pkB[PK_BEST] as number;
  let pendingB = pkB[PK_PENDING] === 1;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let k = 1; k <= n; k++) {
    const a1A = bNA * SA * IA;
    const a1B = bNB * SB * IB;
    const dS1A = -a1A;
    const dS1B = -a1B;
    const dI1A = a1A - gA * IA;
    const dI1B = a1B - gB * IB;
    const S2A = SA + h2 * dS1A;
    const S2B = SB + h2 * dS1B;
    const I2A = IA + h2 * dI1A;
    const I2B = IB + h2 * dI1B;
    const a2A = bNA * S2A * I2A;
    const a2B = bNB * S2B * I2B;
    const dS2A = -a2A;
    const dS2B = -a2B;
    const dI2A = a2A - gA * I2A;
    const dI2B = a2B - gB * I2B;
    const S3A = SA + h2 * dS2A;
    const S3B = SB + h2 * dS2B;
    const I3A = IA + h2 * dI2A;
    const I3B = IB + h2 * dI2B;
    const a3A = bNA * S3A * I3A;
    const a3B = bNB * S3B * I3B;
    const dS3A = -a3A;
    const dS3B = -a3B;
    const dI3A = a3A - gA * I3A;
    const dI3B = a3B - gB * I3B;
    const S4A = SA + h * dS3A;
    const S4B = SB + h * dS3B;
    const I4A = IA + h * dI3A;
    const I4B = IB + h * dI3B;
    const a4A = bNA * S4A * I4A;
    const a4B = bNB * S4B * I4B;
    const dS4A = -a4A;
    const dS4B = -a4B;
    const dI4A = a4A - gA * I4A;
    const dI4B = a4B - gB * I4B;
    const SnA = SA + h6 * (dS1A + 2 * dS2A + 2 * dS3A + dS4A);
    const SnB = SB + h6 * (dS1B + 2 * dS2B + 2 * dS3B + dS4B);
    const InA = IA + h6 * (dI1A + 2 * dI2A + 2 * dI3A + dI4A);
    const InB = IB + h6 * (dI1B + 2 * dI2B + 2 * dI3B + dI4B);
    CA += h6 * (a1A + 2 * a2A + 2 * a3A + a4A);
    CB += h6 * (a1B + 2 * a2B + 2 * a3B + a4B);
    if (pendingA) {
      pendingA = false;
      pkA[PK_HAS2] = 1;
      pkA[PK_T2] = t0 + k * h;
      pkA[PK_S2] = SnA;
      pkA[PK_E2] = 0;
      pkA[PK_I2] = InA;
      pkA[PK_BN2] = bNA;
    }
    if (InA > bestA) {
      bestA = InA;
      pkA[PK_HAS0] = 1;
      pkA[PK_T0] = t0 + (k - 1) * h;
      pkA[PK_S0] = SA;
      pkA[PK_E0] = 0;
      pkA[PK_I0] = IA;
      pkA[PK_BN1] = bNA;
      pkA[PK_T1] = t0 + k * h;
      pkA[PK_S1] = SnA;
      pkA[PK_E1] = 0;
      pkA[PK_HAS2] = 0;
      pendingA = true;
    }
    SA = SnA;
    IA = InA;
    if (pendingB) {
      pendingB = false;
      pkB[PK_HAS2] = 1;
      pkB[PK_T2] = t0 + k * h;
      pkB[PK_S2] = SnB;
      pkB[PK_E2] = 0;
      pkB[PK_I2] = InB;
      pkB[PK_BN2] = bNB;
    }
    if (InB > bestB) {
      bestB = InB;
      pkB[PK_HAS0] = 1;
      pkB[PK_T0] = t0 + (k - 1) * h;
      pkB[PK_S0] = SB;
      pkB[PK_E0] = 0;
      pkB[PK_I0] = IB;
      pkB[PK_BN1] = bNB;
      pkB[PK_T1] = t0 + k * h;
      pkB[PK_S1] = SnB;
      pkB[PK_E1] = 0;
      pkB[PK_HAS2] = 0;
      pendingB = true;
    }
    SB = SnB;
    IB = InB;
  }
  yA[Y_S] = SA;
  yA[Y_I] = IA;
  yA[Y_C] = CA;
  pkA[PK_BEST] = bestA;
  pkA[PK_PENDING] = pendingA ? 1 : 0;
  yB[Y_S] = SB;
  yB[Y_I] = IB;
  yB[Y_C] = CB;
  pkB[PK_BEST] = bestB;
  pkB[PK_PENDING] = pendingB ? 1 : 0;
};

export const rk4SEIR2: Kernel2 = (yA, pA, pkA, yB, pB, pkB, t0, h, n) => {
  const bNA = pA[P_BN] as number;
  const gA = pA[P_G] as number;
  const sgA = pA[P_SIG] as number;
  let SA = yA[Y_S] as number;
  let EA = yA[Y_E] as number;
  let IA = yA[Y_I] as number;
  let CA = yA[Y_C] as number;
  let bestA = pkA[PK_BEST] as number;
  let pendingA = pkA[PK_PENDING] === 1;
  const bNB = pB[P_BN] as number;
  const gB = pB[P_G] as number;
  const sgB = pB[P_SIG] as number;
  let SB = yB[Y_S] as number;
  let EB = yB[Y_E] as number;
  let IB = yB[Y_I] as number;
  let CB = yB[Y_C] as number;
  let bestB = pkB[PK_BEST] as number;
  let pendingB = pkB[PK_PENDING] === 1;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let k = 1; k <= n; k++) {
    const a1A = bNA * SA * IA;
    const a1B = bNB * SB * IB;
    const dS1A = -a1A;
    const dS1B = -a1B;
    const dE1A = a1A - sgA * EA;
    const dE1B = a1B - sgB * EB;
    const dI1A = sgA * EA - gA * IA;
    const dI1B = sgB * EB - gB * IB;
    const S2A = SA + h2 * dS1A;
    const S2B = SB + h2 * dS1B;
    const E2A = EA + h2 * dE1A;
    const E2B = EB + h2 * dE1B;
    const I2A = IA + h2 * dI1A;
    const I2B = IB + h2 * dI1B;
    const a2A = bNA * S2A * I2A;
    const a2B = bNB * S2B * I2B;
    const dS2A = -a2A;
    const dS2B = -a2B;
    const dE2A = a2A - sgA * E2A;
    const dE2B = a2B - sgB * E2B;
    const dI2A = sgA * E2A - gA * I2A;
    const dI2B = sgB * E2B - gB * I2B;
    const S3A = SA + h2 * dS2A;
    const S3B = SB + h2 * dS2B;
    const E3A = EA + h2 * dE2A;
    const E3B = EB + h2 * dE2B;
    const I3A = IA + h2 * dI2A;
    const I3B = IB + h2 * dI2B;
    const a3A = bNA * S3A * I3A;
    const a3B = bNB * S3B * I3B;
    const dS3A = -a3A;
    const dS3B = -a3B;
    const dE3A = a3A - sgA * E3A;
    const dE3B = a3B - sgB * E3B;
    const dI3A = sgA * E3A - gA * I3A;
    const dI3B = sgB * E3B - gB * I3B;
    const S4A = SA + h * dS3A;
    const S4B = SB + h * dS3B;
    const E4A = EA + h * dE3A;
    const E4B = EB + h * dE3B;
    const I4A = IA + h * dI3A;
    const I4B = IB + h * dI3B;
    const a4A = bNA * S4A * I4A;
    const a4B = bNB * S4B * I4B;
    const dS4A = -a4A;
    const dS4B = -a4B;
    const dE4A = a4A - sgA * E4A;
    const dE4B = a4B - sgB * E4B;
    const dI4A = sgA * E4A - gA * I4A;
    const dI4B = sgB * E4B - gB * I4B;
    const SnA = SA + h6 * (dS1A + 2 * dS2A + 2 * dS3A + dS4A);
    const SnB = SB + h6 * (dS1B + 2 * dS2B + 2 * dS3B + dS4B);
    const EnA = EA + h6 * (dE1A + 2 * dE2A + 2 * dE3A + dE4A);
    const EnB = EB + h6 * (dE1B + 2 * dE2B + 2 * dE3B + dE4B);
    const InA = IA + h6 * (dI1A + 2 * dI2A + 2 * dI3A + dI4A);
    const InB = IB + h6 * (dI1B + 2 * dI2B + 2 * dI3B + dI4B);
    CA += h6 * (a1A + 2 * a2A + 2 * a3A + a4A);
    CB += h6 * (a1B + 2 * a2B + 2 * a3B + a4B);
    if (pendingA) {
      pendingA = false;
      pkA[PK_HAS2] = 1;
      pkA[PK_T2] = t0 + k * h;
      pkA[PK_S2] = SnA;
      pkA[PK_E2] = EnA;
      pkA[PK_I2] = InA;
      pkA[PK_BN2] = bNA;
    }
    if (InA > bestA) {
      bestA = InA;
      pkA[PK_HAS0] = 1;
      pkA[PK_T0] = t0 + (k - 1) * h;
      pkA[PK_S0] = SA;
      pkA[PK_E0] = EA;
      pkA[PK_I0] = IA;
      pkA[PK_BN1] = bNA;
      pkA[PK_T1] = t0 + k * h;
      pkA[PK_S1] = SnA;
      pkA[PK_E1] = EnA;
      pkA[PK_HAS2] = 0;
      pendingA = true;
    }
    SA = SnA;
    EA = EnA;
    IA = InA;
    if (pendingB) {
      pendingB = false;
      pkB[PK_HAS2] = 1;
      pkB[PK_T2] = t0 + k * h;
      pkB[PK_S2] = SnB;
      pkB[PK_E2] = EnB;
      pkB[PK_I2] = InB;
      pkB[PK_BN2] = bNB;
    }
    if (InB > bestB) {
      bestB = InB;
      pkB[PK_HAS0] = 1;
      pkB[PK_T0] = t0 + (k - 1) * h;
      pkB[PK_S0] = SB;
      pkB[PK_E0] = EB;
      pkB[PK_I0] = IB;
      pkB[PK_BN1] = bNB;
      pkB[PK_T1] = t0 + k * h;
      pkB[PK_S1] = SnB;
      pkB[PK_E1] = EnB;
      pkB[PK_HAS2] = 0;
      pendingB = true;
    }
    SB = SnB;
    EB = EnB;
    IB = InB;
  }
  yA[Y_S] = SA;
  yA[Y_E] = EA;
  yA[Y_I] = IA;
  yA[Y_C] = CA;
  pkA[PK_BEST] = bestA;
  pkA[PK_PENDING] = pendingA ? 1 : 0;
  yB[Y_S] = SB;
  yB[Y_E] = EB;
  yB[Y_I] = IB;
  yB[Y_C] = CB;
  pkB[PK_BEST] = bestB;
  pkB[PK_PENDING] = pendingB ? 1 : 0;
};

export const rk4SIRS2: Kernel2 = (yA, pA, pkA, yB, pB, pkB, t0, h, n) => {
  const bNA = pA[P_BN] as number;
  const gA = pA[P_G] as number;
  const omA = pA[P_OM] as number;
  let SA = yA[Y_S] as number;
  let IA = yA[Y_I] as number;
  let RA = yA[Y_R] as number;
  let CA = yA[Y_C] as number;
  let bestA = pkA[PK_BEST] as number;
  let pendingA = pkA[PK_PENDING] === 1;
  const bNB = pB[P_BN] as number;
  const gB = pB[P_G] as number;
  const omB = pB[P_OM] as number;
  let SB = yB[Y_S] as number;
  let IB = yB[Y_I] as number;
  let RB = yB[Y_R] as number;
  let CB = yB[Y_C] as number;
  let bestB = pkB[PK_BEST] as number;
  let pendingB = pkB[PK_PENDING] === 1;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let k = 1; k <= n; k++) {
    const a1A = bNA * SA * IA;
    const a1B = bNB * SB * IB;
    const dS1A = -a1A + omA * RA;
    const dS1B = -a1B + omB * RB;
    const dI1A = a1A - gA * IA;
    const dI1B = a1B - gB * IB;
    const dR1A = gA * IA - omA * RA;
    const dR1B = gB * IB - omB * RB;
    const S2A = SA + h2 * dS1A;
    const S2B = SB + h2 * dS1B;
    const I2A = IA + h2 * dI1A;
    const I2B = IB + h2 * dI1B;
    const R2A = RA + h2 * dR1A;
    const R2B = RB + h2 * dR1B;
    const a2A = bNA * S2A * I2A;
    const a2B = bNB * S2B * I2B;
    const dS2A = -a2A + omA * R2A;
    const dS2B = -a2B + omB * R2B;
    const dI2A = a2A - gA * I2A;
    const dI2B = a2B - gB * I2B;
    const dR2A = gA * I2A - omA * R2A;
    const dR2B = gB * I2B - omB * R2B;
    const S3A = SA + h2 * dS2A;
    const S3B = SB + h2 * dS2B;
    const I3A = IA + h2 * dI2A;
    const I3B = IB + h2 * dI2B;
    const R3A = RA + h2 * dR2A;
    const R3B = RB + h2 * dR2B;
    const a3A = bNA * S3A * I3A;
    const a3B = bNB * S3B * I3B;
    const dS3A = -a3A + omA * R3A;
    const dS3B = -a3B + omB * R3B;
    const dI3A = a3A - gA * I3A;
    const dI3B = a3B - gB * I3B;
    const dR3A = gA * I3A - omA * R3A;
    const dR3B = gB * I3B - omB * R3B;
    const S4A = SA + h * dS3A;
    const S4B = SB + h * dS3B;
    const I4A = IA + h * dI3A;
    const I4B = IB + h * dI3B;
    const R4A = RA + h * dR3A;
    const R4B = RB + h * dR3B;
    const a4A = bNA * S4A * I4A;
    const a4B = bNB * S4B * I4B;
    const dS4A = -a4A + omA * R4A;
    const dS4B = -a4B + omB * R4B;
    const dI4A = a4A - gA * I4A;
    const dI4B = a4B - gB * I4B;
    const dR4A = gA * I4A - omA * R4A;
    const dR4B = gB * I4B - omB * R4B;
    const SnA = SA + h6 * (dS1A + 2 * dS2A + 2 * dS3A + dS4A);
    const SnB = SB + h6 * (dS1B + 2 * dS2B + 2 * dS3B + dS4B);
    const InA = IA + h6 * (dI1A + 2 * dI2A + 2 * dI3A + dI4A);
    const InB = IB + h6 * (dI1B + 2 * dI2B + 2 * dI3B + dI4B);
    CA += h6 * (a1A + 2 * a2A + 2 * a3A + a4A);
    CB += h6 * (a1B + 2 * a2B + 2 * a3B + a4B);
    if (pendingA) {
      pendingA = false;
      pkA[PK_HAS2] = 1;
      pkA[PK_T2] = t0 + k * h;
      pkA[PK_S2] = SnA;
      pkA[PK_E2] = 0;
      pkA[PK_I2] = InA;
      pkA[PK_BN2] = bNA;
    }
    if (InA > bestA) {
      bestA = InA;
      pkA[PK_HAS0] = 1;
      pkA[PK_T0] = t0 + (k - 1) * h;
      pkA[PK_S0] = SA;
      pkA[PK_E0] = 0;
      pkA[PK_I0] = IA;
      pkA[PK_BN1] = bNA;
      pkA[PK_T1] = t0 + k * h;
      pkA[PK_S1] = SnA;
      pkA[PK_E1] = 0;
      pkA[PK_HAS2] = 0;
      pendingA = true;
    }
    RA += h6 * (dR1A + 2 * dR2A + 2 * dR3A + dR4A);
    SA = SnA;
    IA = InA;
    if (pendingB) {
      pendingB = false;
      pkB[PK_HAS2] = 1;
      pkB[PK_T2] = t0 + k * h;
      pkB[PK_S2] = SnB;
      pkB[PK_E2] = 0;
      pkB[PK_I2] = InB;
      pkB[PK_BN2] = bNB;
    }
    if (InB > bestB) {
      bestB = InB;
      pkB[PK_HAS0] = 1;
      pkB[PK_T0] = t0 + (k - 1) * h;
      pkB[PK_S0] = SB;
      pkB[PK_E0] = 0;
      pkB[PK_I0] = IB;
      pkB[PK_BN1] = bNB;
      pkB[PK_T1] = t0 + k * h;
      pkB[PK_S1] = SnB;
      pkB[PK_E1] = 0;
      pkB[PK_HAS2] = 0;
      pendingB = true;
    }
    RB += h6 * (dR1B + 2 * dR2B + 2 * dR3B + dR4B);
    SB = SnB;
    IB = InB;
  }
  yA[Y_S] = SA;
  yA[Y_I] = IA;
  yA[Y_R] = RA;
  yA[Y_C] = CA;
  pkA[PK_BEST] = bestA;
  pkA[PK_PENDING] = pendingA ? 1 : 0;
  yB[Y_S] = SB;
  yB[Y_I] = IB;
  yB[Y_R] = RB;
  yB[Y_C] = CB;
  pkB[PK_BEST] = bestB;
  pkB[PK_PENDING] = pendingB ? 1 : 0;
};
