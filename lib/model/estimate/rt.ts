/**
 * Time-varying reproduction number by the renewal-equation method of Cori, Ferguson, Fraser &
 * Cauchemez (2013), "A new framework and software to estimate time-varying reproduction numbers
 * during epidemics", Am J Epidemiol 178:1505–1512.
 *
 * Model: I_t ~ Poisson(R_t · Λ_t) with Λ_t = Σ_{s≥1} I_{t−s} w_s, R constant over a trailing window
 * of τ days, Gamma(shape a, scale b) prior. The posterior for the window ending on day t is
 * Gamma(a + Σ I_k, 1 / (1/b + Σ Λ_k)), sums over k = t−τ+1..t.
 */
import { gammaCdf, gammaQuantile } from './special';

export type SerialIntervalDiscretisation = 'shifted' | 'unshifted';

export interface SerialIntervalSpec {
  /** Mean serial interval, days (> 1 for the 'shifted' discretisation). */
  siMean: number;
  /** Standard deviation of the serial interval, days. */
  siSd: number;
  /**
   * 'shifted' (default), as in Cori et al.'s web appendix: SI = 1 + Gamma with mean siMean − 1 and
   * sd siSd, so no same-day transmission. 'unshifted': SI ~ Gamma(mean siMean, sd siSd). Both are
   * discretised with the triangle (linear-interpolation) kernel
   *   w_k = ∫ max(0, 1 − |x − k|) f(x) dx,
   * which keeps Σ w_k = 1 and Σ k·w_k = the continuous mean exactly. For 'unshifted' the weight
   * w_0 (same-day pairs) is dropped and the rest renormalised.
   */
  discretisation?: SerialIntervalDiscretisation;
}

/**
 * Discrete serial-interval weights w[0..K] with w[0] = 0, truncated where the remaining mass is below
 * 1e-12 (and at most 1000 days); the weights sum to 1.
 */
export function discretiseSerialInterval(spec: SerialIntervalSpec): Float64Array {
  const { siMean, siSd } = spec;
  const mode = spec.discretisation ?? 'shifted';
  const shift = mode === 'shifted' ? 1 : 0;
  const m = siMean - shift;
  if (!(siSd > 0) || !(m > 0)) {
    throw new RangeError(
      mode === 'shifted'
        ? 'serial interval: need siMean > 1 day and siSd > 0 (the shifted discretisation starts at 1 day)'
        : 'serial interval: need siMean > 0 and siSd > 0',
    );
  }
  const shape = (m / siSd) ** 2;
  const scale = (siSd * siSd) / m;
  // In y = x − shift: G0(u) = P(Y ≤ u), G1(u) = E[Y; Y ≤ u] = shape·scale·F_{shape+1}(u).
  const G0 = (u: number) => (u <= 0 ? 0 : gammaCdf(u, shape, scale));
  const G1 = (u: number) => (u <= 0 ? 0 : shape * scale * gammaCdf(u, shape + 1, scale));
  const weightAt = (k: number) => {
    const c = k - shift; // centre of the kernel in y
    const left = G1(c) - G1(c - 1) - (c - 1) * (G0(c) - G0(c - 1));
    const right = (c + 1) * (G0(c + 1) - G0(c)) - (G1(c + 1) - G1(c));
    return Math.max(0, left + right);
  };
  const out: number[] = [0];
  let total = 0;
  for (let k = 1; k <= 1000; k++) {
    const w = weightAt(k);
    out.push(w);
    total += w;
    // Remaining mass beyond the kernel of day k.
    if (k - shift > m && 1 - G0(k - shift) < 1e-12) break;
  }
  const w = Float64Array.from(out);
  for (let k = 1; k < w.length; k++) w[k] = w[k]! / total;
  return w;
}

export interface RtOptions extends SerialIntervalSpec {
  /** Length of the trailing window over which R is held constant, days; default 7. */
  window?: number;
  /** Shape of the gamma prior on R; default 1 (with scale 5: prior mean 5, sd 5, as Cori et al.). */
  priorShape?: number;
  /** Scale of the gamma prior on R; default 5. */
  priorScale?: number;
  /** Credible level of [lo, hi], fraction; default 0.95. */
  level?: number;
  /** Explicit discrete serial interval w[0..K] (w[0] must be 0); overrides siMean / siSd. */
  weights?: ArrayLike<number>;
}

export interface RtEstimate {
  /** Last day of the window (index into the incidence array). */
  day: number;
  /** Posterior mean of R_t. */
  mean: number;
  /** Posterior median of R_t. */
  median: number;
  /** Lower end of the credible interval. */
  lo: number;
  /** Upper end of the credible interval. */
  hi: number;
  /** Posterior coefficient of variation, fraction: 1/√shape. */
  cv: number;
  /** Cases in the window, people. Cori et al. advise ≥ 12 before reading an estimate. */
  cases: number;
  /** Total infectiousness Σ Λ_k over the window, people. */
  infectiousness: number;
}

/**
 * R_t for every day t ≥ window (so each window starts on day 1 or later; day 0 seeds the series) on
 * which the window has non-zero total infectiousness. Days whose window has no infectiousness are
 * skipped (the posterior is just the prior).
 */
export function estimateRt(incidence: ArrayLike<number>, options: RtOptions): RtEstimate[] {
  const tau = options.window ?? 7;
  const a0 = options.priorShape ?? 1;
  const b0 = options.priorScale ?? 5;
  const level = options.level ?? 0.95;
  if (!Number.isInteger(tau) || tau < 1) throw new RangeError('estimateRt: window must be a whole number of days ≥ 1');
  if (!(a0 > 0) || !(b0 > 0)) throw new RangeError('estimateRt: prior shape and scale must be positive');
  const w = options.weights ? Float64Array.from(options.weights as ArrayLike<number>) : discretiseSerialInterval(options);
  if (w.length > 0 && w[0] !== 0) throw new RangeError('estimateRt: the serial interval must give no weight to day 0');
  const n = incidence.length;
  const I = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    const v = incidence[t]!;
    if (!Number.isFinite(v) || v < 0) throw new RangeError(`estimateRt: count on day ${t} is not a non-negative number`);
    I[t] = v;
  }
  const lambda = new Float64Array(n);
  for (let t = 1; t < n; t++) {
    let s = 0;
    const kmax = Math.min(t, w.length - 1);
    for (let k = 1; k <= kmax; k++) s += I[t - k]! * w[k]!;
    lambda[t] = s;
  }
  const pLo = (1 - level) / 2;
  const pHi = 1 - pLo;
  const out: RtEstimate[] = [];
  // Direct window sums (O(n·τ)); running sums would leave round-off residue after long zero runs.
  for (let t = tau; t < n; t++) {
    let sumI = 0;
    let sumL = 0;
    for (let k = t - tau + 1; k <= t; k++) {
      sumI += I[k]!;
      sumL += lambda[k]!;
    }
    if (!(sumL > 0)) continue;
    const shape = a0 + sumI;
    const scale = 1 / (1 / b0 + sumL);
    out.push({
      day: t,
      mean: shape * scale,
      median: gammaQuantile(0.5, shape, scale),
      lo: gammaQuantile(pLo, shape, scale),
      hi: gammaQuantile(pHi, shape, scale),
      cv: 1 / Math.sqrt(shape),
      cases: sumI,
      infectiousness: sumL,
    });
  }
  return out;
}
