/**
 * Fixed-step integrators (forward Euler, classical RK4), one hand-specialised loop per model.
 *
 * Each kernel advances the state `y` in place by `n` steps of size `h` days, starting at day `t0`, with
 * the rates of one segment held constant (the driver splits the horizon at every switch so rates are
 * constant inside a call). Scalars live in locals: no allocation and no calls inside the loop.
 *
 * Every Runge–Kutta stage's derivatives sum to zero over the compartments, so S + E + I + R + V = N is
 * kept to round-off. R, V and the cumulative infections C are not fed back (except R in SIRS), so they
 * are accumulated from the stage flows instead of being carried as separate stage states.
 *
 * The kernels also follow the running maximum of I on the step points and keep the states around it
 * (see PK_* below) so the summary can refine the peak between steps.
 */

/** Layout of the state vector y (people). C = cumulative new infections since t = 0. */
export const Y_S = 0;
export const Y_E = 1;
export const Y_I = 2;
export const Y_R = 3;
export const Y_V = 4;
export const Y_C = 5;
export const Y_LEN = 6;

/** Layout of the segment-parameter vector p. */
export const P_N = 0; // people
export const P_BN = 1; // effective β / N, per person per day
export const P_G = 2; // γ, per day
export const P_SIG = 3; // σ, per day
export const P_OM = 4; // ω, per day
export const P_NU = 5; // vaccination rate, per day
export const P_LEN = 6;

/**
 * Peak tracker. Point 0 = step start before the best step point, point 1 = best step point,
 * point 2 = the step point after it. bN1 / bN2 = β/N of the steps 0→1 and 1→2 (the slope of I is
 * discontinuous at a switch, so each interval keeps its own).
 */
export const PK_BEST = 0;
export const PK_HAS0 = 1;
export const PK_T0 = 2;
export const PK_S0 = 3;
export const PK_E0 = 4;
export const PK_I0 = 5;
export const PK_BN1 = 6;
export const PK_T1 = 7;
export const PK_S1 = 8;
export const PK_E1 = 9;
export const PK_PENDING = 10;
export const PK_HAS2 = 11;
export const PK_T2 = 12;
export const PK_S2 = 13;
export const PK_E2 = 14;
export const PK_I2 = 15;
export const PK_BN2 = 16;
export const PK_LEN = 17;

export type Kernel = (y: Float64Array, p: Float64Array, t0: number, h: number, n: number, pk: Float64Array) => void;

/** Starts the tracker with the initial state as the best point (a decaying outbreak peaks at t = 0). */
export function initPeak(pk: Float64Array, y: Float64Array): void {
  pk.fill(0);
  pk[PK_BEST] = y[Y_I] ?? 0;
  pk[PK_T1] = 0;
  pk[PK_S1] = y[Y_S] ?? 0;
  pk[PK_E1] = y[Y_E] ?? 0;
  pk[PK_PENDING] = 1;
}

/** Tracker update after one step from (ta, Sa, Ea, Ia) to (tb, Sb, Eb, Ib); used by the adaptive driver. */
export function trackPeak(
  pk: Float64Array,
  bN: number,
  ta: number,
  Sa: number,
  Ea: number,
  Ia: number,
  tb: number,
  Sb: number,
  Eb: number,
  Ib: number,
): void {
  if (pk[PK_PENDING] === 1) {
    pk[PK_PENDING] = 0;
    pk[PK_HAS2] = 1;
    pk[PK_T2] = tb;
    pk[PK_S2] = Sb;
    pk[PK_E2] = Eb;
    pk[PK_I2] = Ib;
    pk[PK_BN2] = bN;
  }
  if (Ib > (pk[PK_BEST] as number)) {
    pk[PK_BEST] = Ib;
    pk[PK_HAS0] = 1;
    pk[PK_T0] = ta;
    pk[PK_S0] = Sa;
    pk[PK_E0] = Ea;
    pk[PK_I0] = Ia;
    pk[PK_BN1] = bN;
    pk[PK_T1] = tb;
    pk[PK_S1] = Sb;
    pk[PK_E1] = Eb;
    pk[PK_PENDING] = 1;
    pk[PK_HAS2] = 0;
  }
}

// The kernels below inline trackPeak by hand: a call per step costs more than the step for SIR.

export const rk4SIR: Kernel = (y, p, t0, h, n, pk) => {
  const bN = p[P_BN] as number;
  const g = p[P_G] as number;
  const nu = p[P_NU] as number;
  let S = y[Y_S] as number;
  let I = y[Y_I] as number;
  let R = y[Y_R] as number;
  let V = y[Y_V] as number;
  let C = y[Y_C] as number;
  let best = pk[PK_BEST] as number;
  let pending = pk[PK_PENDING] === 1;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let k = 1; k <= n; k++) {
    const a1 = bN * S * I;
    const dS1 = -a1 - nu * S;
    const dI1 = a1 - g * I;
    const S2 = S + h2 * dS1;
    const I2 = I + h2 * dI1;
    const a2 = bN * S2 * I2;
    const dS2 = -a2 - nu * S2;
    const dI2 = a2 - g * I2;
    const S3 = S + h2 * dS2;
    const I3 = I + h2 * dI2;
    const a3 = bN * S3 * I3;
    const dS3 = -a3 - nu * S3;
    const dI3 = a3 - g * I3;
    const S4 = S + h * dS3;
    const I4 = I + h * dI3;
    const a4 = bN * S4 * I4;
    const dS4 = -a4 - nu * S4;
    const dI4 = a4 - g * I4;
    const Sn = S + h6 * (dS1 + 2 * dS2 + 2 * dS3 + dS4);
    const In = I + h6 * (dI1 + 2 * dI2 + 2 * dI3 + dI4);
    R += h6 * g * (I + 2 * I2 + 2 * I3 + I4);
    V += h6 * nu * (S + 2 * S2 + 2 * S3 + S4);
    C += h6 * (a1 + 2 * a2 + 2 * a3 + a4);
    if (pending) {
      pending = false;
      pk[PK_HAS2] = 1;
      pk[PK_T2] = t0 + k * h;
      pk[PK_S2] = Sn;
      pk[PK_E2] = 0;
      pk[PK_I2] = In;
      pk[PK_BN2] = bN;
    }
    if (In > best) {
      best = In;
      pk[PK_HAS0] = 1;
      pk[PK_T0] = t0 + (k - 1) * h;
      pk[PK_S0] = S;
      pk[PK_E0] = 0;
      pk[PK_I0] = I;
      pk[PK_BN1] = bN;
      pk[PK_T1] = t0 + k * h;
      pk[PK_S1] = Sn;
      pk[PK_E1] = 0;
      pk[PK_HAS2] = 0;
      pending = true;
    }
    S = Sn;
    I = In;
  }
  y[Y_S] = S;
  y[Y_I] = I;
  y[Y_R] = R;
  y[Y_V] = V;
  y[Y_C] = C;
  pk[PK_BEST] = best;
  pk[PK_PENDING] = pending ? 1 : 0;
};

export const rk4SEIR: Kernel = (y, p, t0, h, n, pk) => {
  const bN = p[P_BN] as number;
  const g = p[P_G] as number;
  const sg = p[P_SIG] as number;
  const nu = p[P_NU] as number;
  let S = y[Y_S] as number;
  let E = y[Y_E] as number;
  let I = y[Y_I] as number;
  let R = y[Y_R] as number;
  let V = y[Y_V] as number;
  let C = y[Y_C] as number;
  let best = pk[PK_BEST] as number;
  let pending = pk[PK_PENDING] === 1;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let k = 1; k <= n; k++) {
    const a1 = bN * S * I;
    const dS1 = -a1 - nu * S;
    const dE1 = a1 - sg * E;
    const dI1 = sg * E - g * I;
    const S2 = S + h2 * dS1;
    const E2 = E + h2 * dE1;
    const I2 = I + h2 * dI1;
    const a2 = bN * S2 * I2;
    const dS2 = -a2 - nu * S2;
    const dE2 = a2 - sg * E2;
    const dI2 = sg * E2 - g * I2;
    const S3 = S + h2 * dS2;
    const E3 = E + h2 * dE2;
    const I3 = I + h2 * dI2;
    const a3 = bN * S3 * I3;
    const dS3 = -a3 - nu * S3;
    const dE3 = a3 - sg * E3;
    const dI3 = sg * E3 - g * I3;
    const S4 = S + h * dS3;
    const E4 = E + h * dE3;
    const I4 = I + h * dI3;
    const a4 = bN * S4 * I4;
    const dS4 = -a4 - nu * S4;
    const dE4 = a4 - sg * E4;
    const dI4 = sg * E4 - g * I4;
    const Sn = S + h6 * (dS1 + 2 * dS2 + 2 * dS3 + dS4);
    const En = E + h6 * (dE1 + 2 * dE2 + 2 * dE3 + dE4);
    const In = I + h6 * (dI1 + 2 * dI2 + 2 * dI3 + dI4);
    R += h6 * g * (I + 2 * I2 + 2 * I3 + I4);
    V += h6 * nu * (S + 2 * S2 + 2 * S3 + S4);
    C += h6 * (a1 + 2 * a2 + 2 * a3 + a4);
    if (pending) {
      pending = false;
      pk[PK_HAS2] = 1;
      pk[PK_T2] = t0 + k * h;
      pk[PK_S2] = Sn;
      pk[PK_E2] = En;
      pk[PK_I2] = In;
      pk[PK_BN2] = bN;
    }
    if (In > best) {
      best = In;
      pk[PK_HAS0] = 1;
      pk[PK_T0] = t0 + (k - 1) * h;
      pk[PK_S0] = S;
      pk[PK_E0] = E;
      pk[PK_I0] = I;
      pk[PK_BN1] = bN;
      pk[PK_T1] = t0 + k * h;
      pk[PK_S1] = Sn;
      pk[PK_E1] = En;
      pk[PK_HAS2] = 0;
      pending = true;
    }
    S = Sn;
    E = En;
    I = In;
  }
  y[Y_S] = S;
  y[Y_E] = E;
  y[Y_I] = I;
  y[Y_R] = R;
  y[Y_V] = V;
  y[Y_C] = C;
  pk[PK_BEST] = best;
  pk[PK_PENDING] = pending ? 1 : 0;
};

export const rk4SIRS: Kernel = (y, p, t0, h, n, pk) => {
  const bN = p[P_BN] as number;
  const g = p[P_G] as number;
  const om = p[P_OM] as number;
  const nu = p[P_NU] as number;
  let S = y[Y_S] as number;
  let I = y[Y_I] as number;
  let R = y[Y_R] as number;
  let V = y[Y_V] as number;
  let C = y[Y_C] as number;
  let best = pk[PK_BEST] as number;
  let pending = pk[PK_PENDING] === 1;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let k = 1; k <= n; k++) {
    const a1 = bN * S * I;
    const dS1 = -a1 - nu * S + om * R;
    const dI1 = a1 - g * I;
    const dR1 = g * I - om * R;
    const S2 = S + h2 * dS1;
    const I2 = I + h2 * dI1;
    const R2 = R + h2 * dR1;
    const a2 = bN * S2 * I2;
    const dS2 = -a2 - nu * S2 + om * R2;
    const dI2 = a2 - g * I2;
    const dR2 = g * I2 - om * R2;
    const S3 = S + h2 * dS2;
    const I3 = I + h2 * dI2;
    const R3 = R + h2 * dR2;
    const a3 = bN * S3 * I3;
    const dS3 = -a3 - nu * S3 + om * R3;
    const dI3 = a3 - g * I3;
    const dR3 = g * I3 - om * R3;
    const S4 = S + h * dS3;
    const I4 = I + h * dI3;
    const R4 = R + h * dR3;
    const a4 = bN * S4 * I4;
    const dS4 = -a4 - nu * S4 + om * R4;
    const dI4 = a4 - g * I4;
    const dR4 = g * I4 - om * R4;
    const Sn = S + h6 * (dS1 + 2 * dS2 + 2 * dS3 + dS4);
    const In = I + h6 * (dI1 + 2 * dI2 + 2 * dI3 + dI4);
    V += h6 * nu * (S + 2 * S2 + 2 * S3 + S4);
    C += h6 * (a1 + 2 * a2 + 2 * a3 + a4);
    if (pending) {
      pending = false;
      pk[PK_HAS2] = 1;
      pk[PK_T2] = t0 + k * h;
      pk[PK_S2] = Sn;
      pk[PK_E2] = 0;
      pk[PK_I2] = In;
      pk[PK_BN2] = bN;
    }
    if (In > best) {
      best = In;
      pk[PK_HAS0] = 1;
      pk[PK_T0] = t0 + (k - 1) * h;
      pk[PK_S0] = S;
      pk[PK_E0] = 0;
      pk[PK_I0] = I;
      pk[PK_BN1] = bN;
      pk[PK_T1] = t0 + k * h;
      pk[PK_S1] = Sn;
      pk[PK_E1] = 0;
      pk[PK_HAS2] = 0;
      pending = true;
    }
    R += h6 * (dR1 + 2 * dR2 + 2 * dR3 + dR4);
    S = Sn;
    I = In;
  }
  y[Y_S] = S;
  y[Y_I] = I;
  y[Y_R] = R;
  y[Y_V] = V;
  y[Y_C] = C;
  pk[PK_BEST] = best;
  pk[PK_PENDING] = pending ? 1 : 0;
};

export const eulerSIR: Kernel = (y, p, t0, h, n, pk) => {
  const bN = p[P_BN] as number;
  const g = p[P_G] as number;
  const nu = p[P_NU] as number;
  let S = y[Y_S] as number;
  let I = y[Y_I] as number;
  let R = y[Y_R] as number;
  let V = y[Y_V] as number;
  let C = y[Y_C] as number;
  let best = pk[PK_BEST] as number;
  let pending = pk[PK_PENDING] === 1;
  for (let k = 1; k <= n; k++) {
    const a = bN * S * I;
    const Sn = S + h * (-a - nu * S);
    const In = I + h * (a - g * I);
    R += h * g * I;
    V += h * nu * S;
    C += h * a;
    if (pending) {
      pending = false;
      pk[PK_HAS2] = 1;
      pk[PK_T2] = t0 + k * h;
      pk[PK_S2] = Sn;
      pk[PK_E2] = 0;
      pk[PK_I2] = In;
      pk[PK_BN2] = bN;
    }
    if (In > best) {
      best = In;
      pk[PK_HAS0] = 1;
      pk[PK_T0] = t0 + (k - 1) * h;
      pk[PK_S0] = S;
      pk[PK_E0] = 0;
      pk[PK_I0] = I;
      pk[PK_BN1] = bN;
      pk[PK_T1] = t0 + k * h;
      pk[PK_S1] = Sn;
      pk[PK_E1] = 0;
      pk[PK_HAS2] = 0;
      pending = true;
    }
    S = Sn;
    I = In;
  }
  y[Y_S] = S;
  y[Y_I] = I;
  y[Y_R] = R;
  y[Y_V] = V;
  y[Y_C] = C;
  pk[PK_BEST] = best;
  pk[PK_PENDING] = pending ? 1 : 0;
};

export const eulerSEIR: Kernel = (y, p, t0, h, n, pk) => {
  const bN = p[P_BN] as number;
  const g = p[P_G] as number;
  const sg = p[P_SIG] as number;
  const nu = p[P_NU] as number;
  let S = y[Y_S] as number;
  let E = y[Y_E] as number;
  let I = y[Y_I] as number;
  let R = y[Y_R] as number;
  let V = y[Y_V] as number;
  let C = y[Y_C] as number;
  let best = pk[PK_BEST] as number;
  let pending = pk[PK_PENDING] === 1;
  for (let k = 1; k <= n; k++) {
    const a = bN * S * I;
    const Sn = S + h * (-a - nu * S);
    const En = E + h * (a - sg * E);
    const In = I + h * (sg * E - g * I);
    R += h * g * I;
    V += h * nu * S;
    C += h * a;
    if (pending) {
      pending = false;
      pk[PK_HAS2] = 1;
      pk[PK_T2] = t0 + k * h;
      pk[PK_S2] = Sn;
      pk[PK_E2] = En;
      pk[PK_I2] = In;
      pk[PK_BN2] = bN;
    }
    if (In > best) {
      best = In;
      pk[PK_HAS0] = 1;
      pk[PK_T0] = t0 + (k - 1) * h;
      pk[PK_S0] = S;
      pk[PK_E0] = E;
      pk[PK_I0] = I;
      pk[PK_BN1] = bN;
      pk[PK_T1] = t0 + k * h;
      pk[PK_S1] = Sn;
      pk[PK_E1] = En;
      pk[PK_HAS2] = 0;
      pending = true;
    }
    S = Sn;
    E = En;
    I = In;
  }
  y[Y_S] = S;
  y[Y_E] = E;
  y[Y_I] = I;
  y[Y_R] = R;
  y[Y_V] = V;
  y[Y_C] = C;
  pk[PK_BEST] = best;
  pk[PK_PENDING] = pending ? 1 : 0;
};

export const eulerSIRS: Kernel = (y, p, t0, h, n, pk) => {
  const bN = p[P_BN] as number;
  const g = p[P_G] as number;
  const om = p[P_OM] as number;
  const nu = p[P_NU] as number;
  let S = y[Y_S] as number;
  let I = y[Y_I] as number;
  let R = y[Y_R] as number;
  let V = y[Y_V] as number;
  let C = y[Y_C] as number;
  let best = pk[PK_BEST] as number;
  let pending = pk[PK_PENDING] === 1;
  for (let k = 1; k <= n; k++) {
    const a = bN * S * I;
    const Sn = S + h * (-a - nu * S + om * R);
    const In = I + h * (a - g * I);
    R += h * (g * I - om * R);
    V += h * nu * S;
    C += h * a;
    if (pending) {
      pending = false;
      pk[PK_HAS2] = 1;
      pk[PK_T2] = t0 + k * h;
      pk[PK_S2] = Sn;
      pk[PK_E2] = 0;
      pk[PK_I2] = In;
      pk[PK_BN2] = bN;
    }
    if (In > best) {
      best = In;
      pk[PK_HAS0] = 1;
      pk[PK_T0] = t0 + (k - 1) * h;
      pk[PK_S0] = S;
      pk[PK_E0] = 0;
      pk[PK_I0] = I;
      pk[PK_BN1] = bN;
      pk[PK_T1] = t0 + k * h;
      pk[PK_S1] = Sn;
      pk[PK_E1] = 0;
      pk[PK_HAS2] = 0;
      pending = true;
    }
    S = Sn;
    I = In;
  }
  y[Y_S] = S;
  y[Y_I] = I;
  y[Y_R] = R;
  y[Y_V] = V;
  y[Y_C] = C;
  pk[PK_BEST] = best;
  pk[PK_PENDING] = pending ? 1 : 0;
};

/**
 * Right-hand sides over the whole state vector, for the adaptive integrator (which needs stage
 * vectors). dy[Y_C] is the infection flow.
 */
export type Rhs = (dy: Float64Array, y: Float64Array, p: Float64Array) => void;

export const rhsSIR: Rhs = (dy, y, p) => {
  const S = y[Y_S] as number;
  const I = y[Y_I] as number;
  const a = (p[P_BN] as number) * S * I;
  const v = (p[P_NU] as number) * S;
  const r = (p[P_G] as number) * I;
  dy[Y_S] = -a - v;
  dy[Y_E] = 0;
  dy[Y_I] = a - r;
  dy[Y_R] = r;
  dy[Y_V] = v;
  dy[Y_C] = a;
};

export const rhsSEIR: Rhs = (dy, y, p) => {
  const S = y[Y_S] as number;
  const E = y[Y_E] as number;
  const I = y[Y_I] as number;
  const a = (p[P_BN] as number) * S * I;
  const v = (p[P_NU] as number) * S;
  const l = (p[P_SIG] as number) * E;
  const r = (p[P_G] as number) * I;
  dy[Y_S] = -a - v;
  dy[Y_E] = a - l;
  dy[Y_I] = l - r;
  dy[Y_R] = r;
  dy[Y_V] = v;
  dy[Y_C] = a;
};

export const rhsSIRS: Rhs = (dy, y, p) => {
  const S = y[Y_S] as number;
  const I = y[Y_I] as number;
  const R = y[Y_R] as number;
  const a = (p[P_BN] as number) * S * I;
  const v = (p[P_NU] as number) * S;
  const r = (p[P_G] as number) * I;
  const w = (p[P_OM] as number) * R;
  dy[Y_S] = -a - v + w;
  dy[Y_E] = 0;
  dy[Y_I] = a - r;
  dy[Y_R] = r - w;
  dy[Y_V] = v;
  dy[Y_C] = a;
};
