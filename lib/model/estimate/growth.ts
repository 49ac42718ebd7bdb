/**
 * Early growth rate from daily counts: Poisson log-linear regression (a GLM with log link),
 * log E[y_t] = a + r·t, fitted by Newton's method (for the canonical log link this is IRLS).
 */
import { chiSquareQuantile } from './special';

export interface GrowthWindow {
  /** First day (index into the incidence array) included in the regression. */
  from: number;
  /** Last day (index) included in the regression, inclusive. */
  to: number;
}

export interface GrowthOptions {
  /** Two-sided confidence level of the interval, fraction; default 0.95. */
  level?: number;
}

export interface GrowthResult {
  /** Exponential growth rate, per day (negative when counts fall). */
  r: number;
  /** Wald interval for r, per day: r ± z·SE with SE from the inverse Fisher information. */
  interval: [number, number];
  /** Standard error of r from the Poisson model, per day. */
  se: number;
  /**
   * Doubling time ln 2 / r, days. Infinity when r ≤ 0 (the counts are not doubling); see
   * `halvingTime` for falling counts.
   */
  doublingTime: number;
  /**
   * Interval for the doubling time, days: [ln2/hi, ln2/lo] when the whole r-interval is positive;
   * the upper end is Infinity when the r-interval reaches 0 or below; [Infinity, Infinity] when it is
   * entirely ≤ 0.
   */
  doublingInterval: [number, number];
  /** Halving time ln 2 / (−r) when r < 0, days; Infinity otherwise. */
  halvingTime: number;
  /** Fitted mean count on the first day of the window (e^a), people per day. */
  intercept: number;
  /**
   * Pearson χ² / (n − 2): about 1 when the counts are Poisson. Well above 1 (over-dispersion, common
   * in surveillance data) means the Wald interval is too narrow; `quasiInterval` widens it.
   */
  dispersion: number;
  /** Interval with the SE scaled by √max(1, dispersion) (quasi-Poisson), per day. */
  quasiInterval: [number, number];
  /** Number of days in the window, days. */
  n: number;
  /** Newton iterations used. */
  iterations: number;
  /** Poisson deviance of the fit. */
  deviance: number;
}

/**
 * Fit log E[y_t] = a + r·(t − from) to incidence[from..to] (whole days).
 *
 * Throws RangeError when the window is outside the series, shorter than 3 days, holds negative or
 * non-finite counts, or has cases on fewer than two distinct days (then the maximum-likelihood r is
 * infinite or undefined).
 */
export function growthRate(
  incidence: ArrayLike<number>,
  window: GrowthWindow,
  options: GrowthOptions = {},
): GrowthResult {
  const { from, to } = window;
  const level = options.level ?? 0.95;
  if (!Number.isInteger(from) || !Number.isInteger(to) || from < 0 || to >= incidence.length || to < from) {
    throw new RangeError(`growthRate: window ${from}..${to} is outside the series of ${incidence.length} days`);
  }
  const n = to - from + 1;
  if (n < 3) throw new RangeError('growthRate: the window needs at least 3 days');
  const y = new Float64Array(n);
  let positiveDays = 0;
  let total = 0;
  for (let i = 0; i < n; i++) {
    const v = incidence[from + i]!;
    if (!Number.isFinite(v) || v < 0) throw new RangeError(`growthRate: count on day ${from + i} is not a non-negative number`);
    y[i] = v;
    total += v;
    if (v > 0) positiveDays++;
  }
  if (positiveDays < 2) throw new RangeError('growthRate: cases on fewer than two days in the window; no growth rate can be estimated');

  // Centre time so that the intercept and slope are nearly uncorrelated: Newton converges fast and
  // the Hessian stays well conditioned for long windows.
  const tc = (n - 1) / 2;
  // Start from least squares on log(y + 0.5).
  let sx = 0;
  let sxx = 0;
  let sy = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const t = i - tc;
    const ly = Math.log(y[i]! + 0.5);
    sx += t;
    sxx += t * t;
    sy += ly;
    sxy += t * ly;
  }
  let r = (sxy - (sx * sy) / n) / (sxx - (sx * sx) / n);
  let a = Math.log(total / n);
  if (!Number.isFinite(r)) r = 0;

  const loglik = (aa: number, rr: number) => {
    let l = 0;
    for (let i = 0; i < n; i++) {
      const eta = aa + rr * (i - tc);
      l += y[i]! * eta - Math.exp(eta);
    }
    return l;
  };

  let ll = loglik(a, r);
  let iterations = 0;
  let h00 = 0;
  let h01 = 0;
  let h11 = 0;
  for (; iterations < 100; iterations++) {
    let g0 = 0;
    let g1 = 0;
    h00 = 0;
    h01 = 0;
    h11 = 0;
    for (let i = 0; i < n; i++) {
      const t = i - tc;
      const mu = Math.exp(a + r * t);
      const res = y[i]! - mu;
      g0 += res;
      g1 += res * t;
      h00 += mu;
      h01 += mu * t;
      h11 += mu * t * t;
    }
    const det = h00 * h11 - h01 * h01;
    const da = (h11 * g0 - h01 * g1) / det;
    const dr = (h00 * g1 - h01 * g0) / det;
    // Step halving keeps each Newton step an ascent step from a poor start.
    let step = 1;
    let nextLl = loglik(a + da, r + dr);
    while (!(nextLl >= ll - 1e-12 * Math.abs(ll)) && step > 1e-10) {
      step /= 2;
      nextLl = loglik(a + step * da, r + step * dr);
    }
    a += step * da;
    r += step * dr;
    const change = Math.abs(step * dr) + Math.abs(step * da);
    ll = nextLl;
    if (change < 1e-12) {
      iterations++;
      break;
    }
  }
  // Fisher information at the optimum.
  let deviance = 0;
  let pearson = 0;
  h00 = 0;
  h01 = 0;
  h11 = 0;
  for (let i = 0; i < n; i++) {
    const t = i - tc;
    const mu = Math.exp(a + r * t);
    const yi = y[i]!;
    h00 += mu;
    h01 += mu * t;
    h11 += mu * t * t;
    deviance += 2 * ((yi > 0 ? yi * Math.log(yi / mu) : 0) - (yi - mu));
    pearson += ((yi - mu) * (yi - mu)) / mu;
  }
  const det = h00 * h11 - h01 * h01;
  const se = Math.sqrt(h00 / det);
  const z = Math.sqrt(chiSquareQuantile(level, 1));
  const interval: [number, number] = [r - z * se, r + z * se];
  const dispersion = n > 2 ? pearson / (n - 2) : Number.NaN;
  const qse = se * Math.sqrt(Math.max(1, dispersion));
  const quasiInterval: [number, number] = [r - z * qse, r + z * qse];

  return {
    r,
    interval,
    se,
    doublingTime: doublingTimeOf(r),
    doublingInterval: doublingIntervalOf(interval),
    halvingTime: r < 0 ? Math.LN2 / -r : Infinity,
    intercept: Math.exp(a - r * tc),
    dispersion,
    quasiInterval,
    n,
    iterations,
    deviance,
  };
}

/** ln 2 / r for r > 0, days; Infinity for r ≤ 0. */
export function doublingTimeOf(r: number): number {
  return r > 0 ? Math.LN2 / r : Infinity;
}

/** Doubling-time interval from an r-interval, days (see GrowthResult.doublingInterval). */
export function doublingIntervalOf([lo, hi]: [number, number]): [number, number] {
  return [doublingTimeOf(hi), doublingTimeOf(lo)];
}

export interface GrowthModel {
  model: 'SIR' | 'SEIR';
  /** Recovery rate, per day (1/infectious period). */
  gamma: number;
  /** Rate of becoming infectious, per day (1/latent period); required for SEIR. */
  sigma?: number;
}

/**
 * R0 implied by an early growth rate r (per day) for exponentially distributed stage durations:
 * SIR R0 = 1 + r/γ; SEIR R0 = (1 + r/σ)(1 + r/γ) (Wallinga & Lipsitch 2007, Proc R Soc B
 * 274:599–604). Valid for r > −min(γ, σ); below that the moment-generating function diverges and
 * NaN is returned.
 */
export function R0FromGrowth(r: number, m: GrowthModel): number {
  if (!(m.gamma > 0)) throw new RangeError('R0FromGrowth: gamma must be positive');
  if (m.model === 'SIR') {
    return r > -m.gamma ? 1 + r / m.gamma : Number.NaN;
  }
  const sigma = m.sigma;
  if (sigma === undefined || !(sigma > 0)) throw new RangeError('R0FromGrowth: SEIR needs a positive sigma');
  if (!(r > -Math.min(sigma, m.gamma))) return Number.NaN;
  return (1 + r / sigma) * (1 + r / m.gamma);
}
