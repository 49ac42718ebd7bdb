/**
 * Calibration of a compartmental model (SIR, SEIR, SIRS) to an outbreak's daily counts: a Fit.
 *
 * - Objective: Poisson deviance D = 2Σ[y ln(y/μ) − (y − μ)], or for least squares the profile
 *   Gaussian criterion n·ln(SSE) (σ² estimated and eliminated). Both equal −2 log-likelihood up to a
 *   constant, so one scale serves the optimiser, the intervals and the samples.
 * - Optimiser: Nelder–Mead on log-parameters (positivity for free, rates on their natural scale), a
 *   few seeded restarts, then a polish from the best vertex.
 * - Intervals: profile likelihood. A value v of a parameter (or of R0 = β/γ) is inside the 95 %
 *   interval when the criterion, re-minimised over the other parameters with that one held at v,
 *   rises by at most χ²₁(0.95) = 3.841 above the minimum (Poisson: deviance; least squares:
 *   n·ln(SSE_v / SSE_min)).
 * - Samples for forecasts: sampling–importance–resampling from a Laplace (normal, in log-parameters)
 *   proposal widened 1.5×, weighted by the exact likelihood, i.e. draws from the posterior under a flat
 *   prior on the log-parameters; their quantiles agree with the profile intervals when the likelihood
 *   is close to normal and remain valid when it is not.
 *
 * Observation model: 'incidence' counts are the new infections of the model in (d−1, d] (every
 * infection reported, on the day it happens — there is no reporting fraction or delay to estimate);
 * 'prevalence' counts are I(d). With the Poisson likelihood on prevalence, successive days are not
 * independent counts, so its intervals are optimistic; least squares is the usual choice there.
 */
import { ModelError } from '../errors';
import type { ModelKind } from '../types';
import { nelderMead } from '../optim/nelder-mead';
import { cholesky, choleskyInverse, logNormalDensity } from './linalg';
import { createRng } from './random';
import { chiSquareQuantile } from './special';
import { TrajectoryEvaluator, type FixedStepMethod, type TrajectoryParams } from './trajectory';
import { growthRate, R0FromGrowth } from './growth';

export type FitParamName = 'beta' | 'gamma' | 'sigma' | 'I0';
export type FitObservation = 'incidence' | 'prevalence';
export type FitLikelihood = 'poisson' | 'leastSquares';

/** Canonical order of the estimated parameters (vectors in the result follow it). */
export const FIT_PARAMS: readonly FitParamName[] = ['beta', 'gamma', 'sigma', 'I0'];

export interface FitOptions {
  /** Extra Nelder–Mead starts besides the first guess; default 3. */
  restarts?: number;
  /** Seed of the restart perturbations and of the samples; default 1. */
  seed?: number;
  /** Parameter draws returned in `samples`; default 1000 (0 to skip). */
  samples?: number;
  /** Proposals drawn for the importance resampling; default 3 × samples. */
  proposals?: number;
  /** 'profile' (default) or 'none' (skip the intervals: faster, e.g. inside a bootstrap). */
  intervals?: 'profile' | 'none';
  /** Interval level, fraction; default 0.95. */
  level?: number;
  /** Cap on criterion evaluations of each Nelder–Mead run of the main fit; default 300·k + 200. */
  maxEvaluations?: number;
}

export interface FitInput {
  model: ModelKind;
  /** N, people. */
  population: number;
  /**
   * Initial compartments at day 0, people. I is the starting value of I0 when I0 is estimated,
   * otherwise fixed. S = N − I − E − R.
   */
  initial: { I: number; E?: number; R?: number };
  /** Days since the outbreak's day 0 (whole, strictly increasing) and the counts on them, people. */
  observed: { day: number[]; value: number[] };
  /** What the counts measure: new infections per day or people currently infectious. */
  observe: FitObservation;
  /** What to fit; the rest stay fixed. */
  estimate: FitParamName[];
  likelihood: FitLikelihood;
  /**
   * Starting values for estimated rates and fixed values for the others, per day. Defaults:
   * gamma 0.2 (5-day infectious period), sigma 0.2 (5-day latent period, SEIR), omega 1/365
   * (SIRS, a year of immunity), beta from the early growth rate of the data (R0 from
   * R0FromGrowth, clamped to 1.1..20) or 2·gamma if that fails.
   */
  params?: { beta?: number; gamma?: number; sigma?: number; omega?: number };
  /** Fixed-step integrator of the fit; default 'rk4' ('dopri5' is not used for fitting). */
  method?: FixedStepMethod;
  /** Step, days; default 0.5 (RK4 at 0.5 day moves fitted values by far less than their uncertainty). */
  step?: number;
  options?: FitOptions;
}

export type FitFlagCode =
  | 'few_informative_days'
  | 'before_peak'
  | 'not_converged'
  | 'overdispersed'
  | 'interval_open'
  | 'hessian_not_positive_definite'
  | 'optimum_moved'
  | 'samples_degenerate';

export interface FitFlag {
  code: FitFlagCode;
  message: string;
}

/** One parameter set drawn from the Fit's uncertainty. Rates per day, I0 in people. */
export interface FitSample {
  beta: number;
  gamma: number;
  sigma?: number;
  I0: number;
}

export type FitIntervalName = FitParamName | 'R0' | 'infectiousPeriod';

export interface FitResult {
  /** The input with defaults filled in (used by fitCurve and forecastFromFit). */
  input: ResolvedFitInput;
  /** Fitted and fixed rates, per day. */
  params: { beta: number; gamma: number; sigma?: number; omega?: number };
  /** Initial compartments with the fitted I0, people. */
  initial: { I: number; E?: number; R?: number };
  /** β/γ. */
  R0: number;
  /** 1/γ, days. */
  infectiousPeriod: number;
  /**
   * Profile-likelihood intervals at `level` for every estimated parameter, for R0 and for the
   * infectious period (when β or γ is estimated). An end that could not be reached within a factor
   * e^8 of the estimate is reported as that bound, with an 'interval_open' flag.
   */
  interval: Partial<Record<FitIntervalName, [number, number]>>;
  intervalMethod: 'profile-likelihood' | 'none';
  /** Interval level, fraction. */
  level: number;
  /** Model values on the observed days, people. */
  fitted: number[];
  /** Pearson residuals (y − μ)/√μ for Poisson, raw y − μ for least squares, on the observed days. */
  residuals: number[];
  /** Poisson deviance, or the sum of squares (people²) for least squares, at the optimum. */
  objective: number;
  objectiveKind: 'poissonDeviance' | 'sumOfSquares';
  /** Pearson χ² / (n − k) for Poisson (≈ 1 if the counts are Poisson); SSE/(n − k) for least squares. */
  dispersion: number;
  converged: boolean;
  /** Nelder–Mead iterations over all starts (the main fit, not the profiles). */
  iterations: number;
  /** Objective evaluations including profiles and samples. */
  evaluations: number;
  flags: FitFlag[];
  /** Draws of the full parameter set (fixed ones constant), for forecastFromFit. */
  samples: FitSample[];
  /** Effective sample size of the importance weights behind `samples`. */
  samplesEffective: number;
  /** Names and covariance (row-major) of the log-parameters from the Hessian of −2 log L. */
  logCovariance: { names: FitParamName[]; matrix: number[] };
}

export interface ResolvedFitInput {
  model: ModelKind;
  population: number;
  initial: { I: number; E: number; R: number };
  observed: { day: number[]; value: number[] };
  observe: FitObservation;
  estimate: FitParamName[];
  likelihood: FitLikelihood;
  params: { beta: number; gamma: number; sigma: number; omega: number };
  method: FixedStepMethod;
  step: number;
}

const LOG_BOUNDS: Record<FitParamName, [number, number]> = {
  beta: [Math.log(1e-5), Math.log(1e3)],
  gamma: [Math.log(1e-4), Math.log(1e3)],
  sigma: [Math.log(1e-4), Math.log(1e3)],
  I0: [Math.log(1e-6), Infinity], // upper end: the population
};

function invalid(field: string, message: string): never {
  throw new ModelError('invalid_input', `${field}: ${message}`, { field });
}

function resolveInput(input: FitInput): ResolvedFitInput {
  const { model, population: N, observed, observe, likelihood } = input;
  if (!(N > 0) || !Number.isFinite(N)) invalid('population', 'must be a positive number');
  if (model !== 'SIR' && model !== 'SEIR' && model !== 'SIRS') invalid('model', 'must be SIR, SEIR or SIRS');
  if (observe !== 'incidence' && observe !== 'prevalence') invalid('observe', "must be 'incidence' or 'prevalence'");
  if (likelihood !== 'poisson' && likelihood !== 'leastSquares') invalid('likelihood', "must be 'poisson' or 'leastSquares'");
  const { day, value } = observed;
  if (day.length !== value.length) invalid('observed', 'day and value must have the same length');
  if (day.length < 2) invalid('observed', 'need at least two observed days');
  for (let i = 0; i < day.length; i++) {
    const d = day[i]!;
    if (!Number.isInteger(d) || d < (observe === 'incidence' ? 1 : 0)) {
      invalid(`observed.day.${i}`, observe === 'incidence' ? 'must be a whole day ≥ 1 (incidence of day d covers d−1..d)' : 'must be a whole day ≥ 0');
    }
    if (i > 0 && d <= day[i - 1]!) invalid(`observed.day.${i}`, 'days must be strictly increasing');
    const v = value[i]!;
    if (!Number.isFinite(v) || v < 0) invalid(`observed.value.${i}`, 'must be a non-negative number');
  }
  const estimate = FIT_PARAMS.filter((p) => input.estimate.includes(p));
  if (estimate.length === 0) invalid('estimate', 'name at least one of beta, gamma, sigma, I0');
  for (const name of input.estimate) if (!FIT_PARAMS.includes(name)) invalid('estimate', `unknown parameter '${String(name)}'`);
  if (estimate.includes('sigma') && model !== 'SEIR') invalid('estimate', 'sigma exists only in SEIR');
  if (estimate.length >= day.length) invalid('estimate', 'more parameters than observed days');

  const E0 = model === 'SEIR' ? (input.initial.E ?? 0) : 0;
  const R0init = input.initial.R ?? 0;
  let I0 = input.initial.I;
  if (!(I0 >= 0)) invalid('initial.I', 'must be ≥ 0');
  if (estimate.includes('I0') && !(I0 > 0)) I0 = 1;
  if (I0 + E0 + R0init > N) invalid('initial', 'I + E + R must be ≤ population');
  if (!estimate.includes('I0') && I0 + E0 === 0) invalid('initial.I', 'no one is infected at day 0; give I (or E) or estimate I0');

  const method = input.method ?? 'rk4';
  if (method !== 'rk4' && method !== 'euler') invalid('method', "fits use 'rk4' or 'euler'");
  const step = input.step ?? 0.5;
  if (!(step > 0 && step <= 1)) invalid('step', 'must be in (0, 1] day');

  const gamma = input.params?.gamma ?? 0.2;
  const sigma = input.params?.sigma ?? 0.2;
  const omega = input.params?.omega ?? 1 / 365;
  if (!(gamma > 0)) invalid('params.gamma', 'must be > 0');
  if (model === 'SEIR' && !(sigma > 0)) invalid('params.sigma', 'must be > 0');
  let beta = input.params?.beta ?? Number.NaN;
  if (!(beta > 0)) beta = betaFromGrowth(model, N, I0 + E0 + R0init, observed, gamma, sigma);
  return {
    model,
    population: N,
    initial: { I: I0, E: E0, R: R0init },
    observed: { day: day.slice(), value: value.slice() },
    observe,
    estimate,
    likelihood,
    params: { beta, gamma, sigma, omega },
    method,
    step,
  };
}

/** Starting β from the growth rate of the rising part of the data (up to its maximum). */
function betaFromGrowth(
  model: ModelKind,
  N: number,
  occupied: number,
  observed: { day: number[]; value: number[] },
  gamma: number,
  sigma: number,
): number {
  const { day, value } = observed;
  let iMax = 0;
  for (let i = 1; i < value.length; i++) if (value[i]! > value[iMax]!) iMax = i;
  const fallback = 2 * gamma;
  if (iMax < 2) return fallback;
  // Daily series on the rising part (gaps filled by log-linear interpolation is overkill; use the days).
  const first = day[0]!;
  const last = day[iMax]!;
  const series = new Array<number>(last - first + 1).fill(Number.NaN);
  for (let i = 0; i <= iMax; i++) series[day[i]! - first] = value[i]!;
  if (series.some((v) => Number.isNaN(v))) return fallback;
  try {
    const g = growthRate(series, { from: 0, to: series.length - 1 });
    const R0 = R0FromGrowth(g.r, model === 'SEIR' ? { model: 'SEIR', gamma, sigma } : { model: 'SIR', gamma });
    if (!Number.isFinite(R0)) return fallback;
    const clamped = Math.min(20, Math.max(1.1, R0));
    return (clamped * gamma * N) / Math.max(1, N - occupied);
  } catch {
    return fallback;
  }
}

/** Everything one evaluation of the criterion needs, preallocated. */
class FitProblem {
  readonly evaluator: TrajectoryEvaluator;
  readonly lastDay: number;
  readonly nObs: number;
  readonly y: Float64Array;
  readonly obsDay: Int32Array;
  readonly mu: Float64Array;
  private readonly series: Float64Array;
  readonly q: TrajectoryParams;
  readonly idx: Record<FitParamName, number>;
  readonly k: number;
  /** Σ y ln y − y, precomputed for the deviance. */
  private readonly saturated: number;
  evaluations = 0;

  constructor(readonly input: ResolvedFitInput) {
    const { model, population, initial, observed, method, step, estimate } = input;
    this.evaluator = new TrajectoryEvaluator(model, population, initial.E, initial.R, method, step);
    this.nObs = observed.day.length;
    this.lastDay = observed.day[this.nObs - 1]!;
    this.y = Float64Array.from(observed.value);
    this.obsDay = Int32Array.from(observed.day);
    this.mu = new Float64Array(this.nObs);
    // One day beyond the data, to tell whether the fitted curve still rises there.
    this.series = new Float64Array(this.lastDay + 2);
    this.q = { beta: input.params.beta, gamma: input.params.gamma, sigma: input.params.sigma, omega: input.params.omega, I0: initial.I };
    this.idx = { beta: -1, gamma: -1, sigma: -1, I0: -1 };
    estimate.forEach((name, i) => (this.idx[name] = i));
    this.k = estimate.length;
    let s = 0;
    for (const v of this.y) s += v > 0 ? v * Math.log(v) - v : 0;
    this.saturated = s;
  }

  /** Set the trajectory parameters from log-parameters x (estimated ones only). */
  setParams(x: ArrayLike<number>): boolean {
    const { idx, q, input } = this;
    for (const name of input.estimate) {
      const v = x[idx[name]]!;
      const [lo, hi] = LOG_BOUNDS[name];
      if (!(v >= lo && v <= hi)) return false;
      q[name] = Math.exp(v);
    }
    if (idx.I0 >= 0 && q.I0 + input.initial.E + input.initial.R > input.population) return false;
    return true;
  }

  /** Model values on the observed days into `mu` (and one day past the data into `series`). */
  computeMu(x: ArrayLike<number>, extraDay = false): boolean {
    if (!this.setParams(x)) return false;
    const to = extraDay ? this.lastDay + 1 : this.lastDay;
    const prev = this.input.observe === 'prevalence';
    const ok = this.evaluator.run(this.q, to, prev ? this.series : null, prev ? null : this.series);
    if (!ok) return false;
    for (let i = 0; i < this.nObs; i++) this.mu[i] = this.series[this.obsDay[i]!]!;
    return true;
  }

  /** Value one day past the data minus the value on the last observed day (after computeMu(x, true)). */
  slopeAtEnd(): number {
    return this.series[this.lastDay + 1]! - this.series[this.lastDay]!;
  }

  /** −2 log-likelihood up to a constant: Poisson deviance or n·ln(SSE). +Infinity when infeasible. */
  criterion = (x: ArrayLike<number>): number => {
    this.evaluations++;
    if (!this.computeMu(x)) return Infinity;
    return this.criterionOfMu();
  };

  criterionOfMu(): number {
    const { y, mu, nObs } = this;
    if (this.input.likelihood === 'poisson') {
      let s = 0;
      for (let i = 0; i < nObs; i++) {
        const m = Math.max(mu[i]!, 1e-12);
        s += mu[i]! > 0 || y[i]! > 0 ? m - y[i]! * Math.log(m) : 0;
      }
      return 2 * (s + this.saturated);
    }
    let sse = 0;
    for (let i = 0; i < nObs; i++) {
      const r = y[i]! - mu[i]!;
      sse += r * r;
    }
    return nObs * Math.log(Math.max(sse, 1e-300));
  }

  /** The reported objective (deviance or SSE) from the criterion. */
  objectiveOf(crit: number): number {
    return this.input.likelihood === 'poisson' ? crit : Math.exp(crit / this.nObs);
  }
}

/** Central finite-difference Hessian of f at x (k ≤ 4), step h in log-parameters. */
function hessian(f: (x: Float64Array) => number, x: Float64Array, fx: number, h: number): Float64Array {
  const k = x.length;
  const H = new Float64Array(k * k);
  const z = Float64Array.from(x);
  const at = (i: number, di: number, j: number, dj: number) => {
    z.set(x);
    z[i] = z[i]! + di;
    z[j] = z[j]! + dj;
    return f(z);
  };
  for (let i = 0; i < k; i++) {
    H[i * k + i] = (at(i, h, i, 0) - 2 * fx + at(i, -h, i, 0)) / (h * h);
    for (let j = 0; j < i; j++) {
      const v = (at(i, h, j, h) - at(i, h, j, -h) - at(i, -h, j, h) + at(i, -h, j, -h)) / (4 * h * h);
      H[i * k + j] = v;
      H[j * k + i] = v;
    }
  }
  return H;
}

interface Optimum {
  x: Float64Array;
  crit: number;
}

/**
 * Fit the chosen parameters of an SIR / SEIR / SIRS model to daily counts. See the module comment
 * for the criterion, optimiser, intervals and samples; FitResult for what comes back.
 * Throws ModelError('invalid_input') on malformed input.
 */
export function fitScenario(input: FitInput): FitResult {
  const resolved = resolveInput(input);
  const opts = input.options ?? {};
  const restarts = opts.restarts ?? 3;
  const seed = opts.seed ?? 1;
  const nSamples = opts.samples ?? 1000;
  const level = opts.level ?? 0.95;
  const cut = chiSquareQuantile(level, 1);
  const problem = new FitProblem(resolved);
  const { k } = problem;
  const names = resolved.estimate;
  const f = problem.criterion;
  const flags: FitFlag[] = [];

  // --- main optimisation -------------------------------------------------------------------------
  const x0 = Float64Array.from(names.map((n) => Math.log(problem.q[n])));
  const rng = createRng(seed);
  const nmMain = { step: 0.3, xTol: 1e-6, fTol: 1e-8, maxEvaluations: opts.maxEvaluations ?? 300 * k + 200 };
  let best: Optimum = { x: x0, crit: f(x0) };
  let iterations = 0;
  for (let s = 0; s <= restarts; s++) {
    const start = Float64Array.from(x0);
    if (s > 0) for (let i = 0; i < k; i++) start[i] = start[i]! + 0.7 * rng.normal();
    const res = nelderMead(f, start, nmMain);
    iterations += res.iterations;
    if (res.fx < best.crit) best = { x: res.x, crit: res.fx };
  }
  const polish = nelderMead(f, best.x, { step: 0.05, xTol: 1e-8, fTol: 1e-10, maxEvaluations: opts.maxEvaluations ?? 400 * k + 200 });
  iterations += polish.iterations;
  if (polish.fx <= best.crit) best = { x: polish.x, crit: polish.fx };
  let converged = polish.converged && Number.isFinite(best.crit);

  // --- curvature: Laplace covariance of the log-parameters (criterion = −2 log L) ----------------
  const laplace = () => {
    const H = hessian(f, best.x, best.crit, 1e-3);
    let L = cholesky(H, k);
    let ridge = 0;
    while (!L && ridge < 1e6) {
      ridge = ridge === 0 ? 1e-6 * (Math.abs(H[0]!) + 1) : ridge * 10;
      const Hr = Float64Array.from(H);
      for (let i = 0; i < k; i++) Hr[i * k + i] = Hr[i * k + i]! + ridge;
      L = cholesky(Hr, k);
    }
    const cov = L ? choleskyInverse(L, k).map((v) => 2 * v) : new Float64Array(k * k).map((_, i) => (i % (k + 1) === 0 ? 0.04 : 0));
    return { cov, pd: ridge === 0 && L !== null };
  };
  let { cov, pd } = laplace();
  if (!pd) {
    flags.push({
      code: 'hessian_not_positive_definite',
      message: 'The likelihood is flat or saddle-shaped in some direction at the optimum: some parameters are not identified by these data.',
    });
  }

  // --- profile-likelihood intervals --------------------------------------------------------------
  const interval: Partial<Record<FitIntervalName, [number, number]>> = {};
  let moved = false;
  const openEnds: string[] = [];
  const ridge: Float64Array[] = [];
  if ((opts.intervals ?? 'profile') === 'profile') {
    const profileOf = (c: Float64Array, label: string): [number, number] => {
      const res = profileInterval(problem, best, cov, c, cut, (better) => {
        best = better;
        moved = true;
      }, ridge);
      if (res.open[0]) openEnds.push(`${label} (lower)`);
      if (res.open[1]) openEnds.push(`${label} (upper)`);
      return [res.lo, res.hi];
    };
    const logIv: Partial<Record<FitParamName | 'R0', [number, number]>> = {};
    for (let i = 0; i < k; i++) {
      const c = new Float64Array(k);
      c[i] = 1;
      logIv[names[i]!] = profileOf(c, names[i]!);
    }
    const ib = problem.idx.beta;
    const ig = problem.idx.gamma;
    if (ib >= 0 && ig >= 0) {
      const c = new Float64Array(k);
      c[ib] = 1;
      c[ig] = -1;
      logIv.R0 = profileOf(c, 'R0');
    }
    if (moved) {
      // A profile found a lower criterion: the main search had stopped early. Redo the intervals
      // once about the better point.
      converged = false;
      flags.push({ code: 'optimum_moved', message: 'The interval search found a better fit than the optimiser; the fit was moved there and its intervals recomputed.' });
      const again = nelderMead(f, best.x, { step: 0.05, xTol: 1e-8, fTol: 1e-10, maxEvaluations: 400 * k + 200 });
      if (again.fx < best.crit) best = { x: again.x, crit: again.fx };
      ({ cov, pd } = laplace());
      openEnds.length = 0;
      ridge.length = 0;
      for (let i = 0; i < k; i++) {
        const c = new Float64Array(k);
        c[i] = 1;
        logIv[names[i]!] = profileOf(c, names[i]!);
      }
      if (ib >= 0 && ig >= 0) {
        const c = new Float64Array(k);
        c[ib] = 1;
        c[ig] = -1;
        logIv.R0 = profileOf(c, 'R0');
      }
    }
    for (const [name, iv] of Object.entries(logIv) as [FitParamName | 'R0', [number, number]][]) {
      interval[name] = [Math.exp(iv[0]), Math.exp(iv[1])];
    }
  }

  // --- final values ------------------------------------------------------------------------------
  problem.computeMu(best.x, true);
  const q = { ...problem.q };
  const fitted = Array.from(problem.mu);
  const rising = problem.slopeAtEnd() > 0;
  const crit = problem.criterionOfMu();
  const { y, nObs } = problem;
  const residuals: number[] = [];
  let pearson = 0;
  let sse = 0;
  for (let i = 0; i < nObs; i++) {
    const m = fitted[i]!;
    const r = y[i]! - m;
    sse += r * r;
    const pr = r / Math.sqrt(Math.max(m, 1e-12));
    pearson += pr * pr;
    residuals.push(resolved.likelihood === 'poisson' ? pr : r);
  }
  const dof = Math.max(1, nObs - k);
  const dispersion = resolved.likelihood === 'poisson' ? pearson / dof : sse / dof;

  const R0 = q.beta / q.gamma;
  if (problem.idx.beta >= 0 && problem.idx.gamma < 0 && interval.beta) {
    interval.R0 = [interval.beta[0] / q.gamma, interval.beta[1] / q.gamma];
  } else if (problem.idx.beta < 0 && problem.idx.gamma >= 0 && interval.gamma) {
    interval.R0 = [q.beta / interval.gamma[1], q.beta / interval.gamma[0]];
  }
  if (interval.gamma) interval.infectiousPeriod = [1 / interval.gamma[1], 1 / interval.gamma[0]];

  // --- flags -------------------------------------------------------------------------------------
  const informative = resolved.observed.value.filter((v) => v > 0).length;
  if (informative < 7) {
    flags.push({
      code: 'few_informative_days',
      message: `Only ${informative} observed day${informative === 1 ? '' : 's'} with cases (fewer than 7): the fit and its ranges are very uncertain.`,
    });
  }
  const values = resolved.observed.value;
  let iMax = 0;
  for (let i = 1; i < values.length; i++) if (values[i]! >= values[iMax]!) iMax = i;
  if (iMax === values.length - 1 || rising) {
    flags.push({
      code: 'before_peak',
      message:
        iMax === values.length - 1
          ? 'The largest count is the last one: the data stop before the peak, so the peak and final size are poorly determined.'
          : 'The fitted curve is still rising after the last observed day: the peak lies beyond the data.',
    });
  }
  if (!converged) {
    flags.push({ code: 'not_converged', message: 'The optimiser stopped before meeting its convergence criteria; treat the fit with caution.' });
  }
  if (resolved.likelihood === 'poisson' && dispersion > 3 && nObs - k >= 3) {
    flags.push({
      code: 'overdispersed',
      message: `The counts vary ${dispersion.toFixed(1)}× more than Poisson noise: the intervals are too narrow (consider least squares).`,
    });
  }
  if (openEnds.length > 0) {
    flags.push({ code: 'interval_open', message: `The data do not bound: ${openEnds.join(', ')}.` });
  }

  // --- samples -----------------------------------------------------------------------------------
  const sampled = nSamples > 0 ? drawSamples(problem, best, cov, ridge, nSamples, opts.proposals ?? 3 * nSamples, seed) : { samples: [], ess: 0 };
  if (nSamples > 0 && sampled.ess < Math.min(100, nSamples / 4)) {
    flags.push({ code: 'samples_degenerate', message: `Only ${Math.round(sampled.ess)} effective parameter draws: the forecast ranges are rough.` });
  }

  const params: FitResult['params'] = { beta: q.beta, gamma: q.gamma };
  if (resolved.model === 'SEIR') params.sigma = q.sigma;
  if (resolved.model === 'SIRS') params.omega = q.omega;
  const initial: FitResult['initial'] = { I: q.I0 };
  if (resolved.model === 'SEIR') initial.E = resolved.initial.E;
  if (resolved.initial.R > 0) initial.R = resolved.initial.R;
  return {
    input: resolved,
    params,
    initial,
    R0,
    infectiousPeriod: 1 / q.gamma,
    interval,
    intervalMethod: (opts.intervals ?? 'profile') === 'profile' ? 'profile-likelihood' : 'none',
    level,
    fitted,
    residuals,
    objective: problem.objectiveOf(crit),
    objectiveKind: resolved.likelihood === 'poisson' ? 'poissonDeviance' : 'sumOfSquares',
    dispersion,
    converged,
    iterations,
    evaluations: problem.evaluations,
    flags,
    samples: sampled.samples,
    samplesEffective: sampled.ess,
    logCovariance: { names: names.slice(), matrix: Array.from(cov) },
  };
}

/**
 * Profile interval of φ = c·x (x = log-parameters): the φ-values where the criterion, minimised with
 * φ held fixed, is `cut` above its minimum. Regula falsi (Illinois) on √Δ(φ) − √cut, which is close
 * to linear in φ, bracketed from a Laplace first guess.
 */
function profileInterval(
  problem: FitProblem,
  best: Optimum,
  cov: Float64Array,
  c: Float64Array,
  cut: number,
  onBetter: (better: Optimum) => void,
  ridge: Float64Array[],
): { lo: number; hi: number; open: [boolean, boolean] } {
  const k = c.length;
  const f = problem.criterion;
  const xHat = best.x;
  let critMin = best.crit;
  const phiHat = dot(c, xHat);
  // Σc and cᵀΣc: the Laplace direction along which the other parameters move with φ.
  const sc = new Float64Array(k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) sc[i] = sc[i]! + cov[i * k + j]! * c[j]!;
  const csc = dot(c, sc);
  const sd = csc > 0 && Number.isFinite(csc) ? Math.sqrt(csc) : 0.3;
  let pivot = 0;
  for (let i = 0; i < k; i++) if (Math.abs(c[i]!) > Math.abs(c[pivot]!)) pivot = i;
  const others: number[] = [];
  for (let i = 0; i < k; i++) if (i !== pivot) others.push(i);
  const full = new Float64Array(k);
  const z = new Float64Array(others.length);
  const zc = Math.sqrt(cut);
  const MAX_SPAN = 8; // e^8 ≈ 3000-fold either way

  // Full log-parameter vector with φ = v and the others at z.
  let currentV = 0;
  const expand = (zz: ArrayLike<number>) => {
    let s = currentV;
    for (let m = 0; m < others.length; m++) {
      const i = others[m]!;
      full[i] = zz[m]!;
      s -= c[i]! * zz[m]!;
    }
    full[pivot] = s / c[pivot]!;
    return full;
  };
  const inner = (zz: Float64Array) => f(expand(zz));

  const profile = (v: number, warm: Float64Array | null): { crit: number; z: Float64Array } => {
    currentV = v;
    // Warm start: the previous nuisance optimum, else the Laplace conditional mean.
    const start = new Float64Array(others.length);
    for (let m = 0; m < others.length; m++) {
      const i = others[m]!;
      start[m] = warm ? warm[m]! : xHat[i]! + (csc > 0 ? (sc[i]! / csc) * (v - phiHat) : 0);
    }
    if (others.length === 0) return { crit: inner(start), z: start };
    const step = new Float64Array(others.length);
    for (let m = 0; m < others.length; m++) {
      const i = others[m]!;
      step[m] = Math.min(0.2, Math.max(1e-3, 0.3 * Math.sqrt(Math.max(cov[i * k + i]!, 0))));
    }
    const res = nelderMead(inner, start, { step, xTol: 1e-6, fTol: 1e-6, maxEvaluations: 150 * others.length + 100 });
    return { crit: res.fx, z: res.x };
  };

  const ends: number[] = [];
  const open: [boolean, boolean] = [false, false];
  for (const side of [-1, 1]) {
    let warm: Float64Array | null = null;
    const g = (v: number) => {
      const p = profile(v, warm);
      warm = p.z;
      // Keep the profile path (inside the interval and a little beyond) to guide the samples.
      if (p.crit - critMin <= cut + 2) ridge.push(Float64Array.from(expand(p.z)));
      if (p.crit < critMin - 1e-6) {
        critMin = p.crit;
        const x = Float64Array.from(expand(p.z));
        onBetter({ x, crit: p.crit });
      }
      return Math.sqrt(Math.max(0, p.crit - critMin)) - zc;
    };
    let a = phiHat;
    let ga = -zc;
    let b = phiHat + side * zc * sd;
    let gb = g(b);
    // Expand outwards until the cut is crossed.
    while (gb < 0 && Math.abs(b - phiHat) < MAX_SPAN) {
      a = b;
      ga = gb;
      b = phiHat + side * Math.min(MAX_SPAN, 2 * Math.abs(b - phiHat));
      gb = g(b);
    }
    if (gb < 0 || !Number.isFinite(gb)) {
      if (!Number.isFinite(gb)) {
        // Infeasible beyond: bisect towards the feasible side for the edge of the feasible region.
        let lo = a;
        let hi = b;
        for (let it = 0; it < 30; it++) {
          const mid = 0.5 * (lo + hi);
          const gm = g(mid);
          if (!Number.isFinite(gm)) hi = mid;
          else if (gm >= 0) {
            hi = mid;
            b = mid;
            gb = gm;
            break;
          } else lo = mid;
        }
        if (!(gb >= 0 && Number.isFinite(gb))) {
          ends.push(lo);
          open[side < 0 ? 0 : 1] = true;
          continue;
        }
      } else {
        ends.push(b);
        open[side < 0 ? 0 : 1] = true;
        continue;
      }
    }
    // Illinois regula falsi on [a, b] with g(a) < 0 ≤ g(b).
    let side0 = 0;
    let v = b;
    for (let it = 0; it < 30; it++) {
      v = b - (gb * (b - a)) / (gb - ga);
      const gv = g(v);
      if (Math.abs(gv) < 2e-3 || Math.abs(b - a) < 1e-5) break;
      if (gv < 0) {
        a = v;
        ga = gv;
        if (side0 === -1) gb /= 2;
        side0 = -1;
      } else {
        b = v;
        gb = gv;
        if (side0 === 1) ga /= 2;
        side0 = 1;
      }
    }
    ends.push(v);
  }
  return { lo: Math.min(ends[0]!, phiHat), hi: Math.max(ends[1]!, phiHat), open };
}

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}

/**
 * Sampling–importance–resampling (Rubin 1988) with a mixture proposal in log-parameters: weight 0.3
 * on N(x̂, 1.5²Σ), the widened Laplace approximation at the optimum, and 0.7 shared by the same
 * normal centred on each point of the profile paths. Those paths trace the likelihood's ridges,
 * which the Laplace approximation alone misses when the data stop before the peak (the ridge
 * β − γ ≈ r is curved in log-parameters). Weights ∝ likelihood / mixture density, then systematic
 * resampling.
 */
/** Metropolis moves per particle after resampling. */
const MOVES = 4;

function drawSamples(
  problem: FitProblem,
  best: Optimum,
  cov: Float64Array,
  ridge: Float64Array[],
  nSamples: number,
  nProposals: number,
  seed: number,
): { samples: FitSample[]; ess: number } {
  const k = problem.k;
  const kappa = 1.5;
  const L =
    cholesky(cov.map((v) => v * kappa * kappa), k) ?? new Float64Array(k * k).map((_, i) => (i % (k + 1) === 0 ? 0.2 : 0));
  const centres: Float64Array[] = [best.x, ...ridge];
  const weights = centres.map((_, i) => (ridge.length === 0 ? 1 : i === 0 ? 0.3 : 0.7 / ridge.length));
  const comps = centres.map((c, i) => ({ weight: weights[i]!, centre: c, L }));
  const rng = createRng(seed ^ 0x5bd1e995);
  const M = Math.max(nProposals, nSamples);
  const xs = new Float64Array(M * k);
  const logw = new Float64Array(M);
  const zv = new Float64Array(k);
  const work = new Float64Array(k);
  const x = new Float64Array(k);
  const lq = new Float64Array(comps.length);
  const crits = new Float64Array(M);
  let maxLw = -Infinity;
  for (let m = 0; m < M; m++) {
    // Pick a component, draw from it.
    let u = rng.next();
    let ci = 0;
    while (ci < comps.length - 1 && u > comps[ci]!.weight) {
      u -= comps[ci]!.weight;
      ci++;
    }
    const Lm = comps[ci]!.L;
    for (let i = 0; i < k; i++) zv[i] = rng.normal();
    const centre = comps[ci]!.centre;
    for (let i = 0; i < k; i++) {
      let s = centre[i]!;
      for (let j = 0; j <= i; j++) s += Lm[i * k + j]! * zv[j]!;
      x[i] = s;
      xs[m * k + i] = s;
    }
    // Mixture density by log-sum-exp.
    let lmax = -Infinity;
    for (let c = 0; c < comps.length; c++) {
      lq[c] = Math.log(comps[c]!.weight) + logNormalDensity(x, comps[c]!.centre, comps[c]!.L, k, work);
      if (lq[c]! > lmax) lmax = lq[c]!;
    }
    let sq = 0;
    for (let c = 0; c < comps.length; c++) sq += Math.exp(lq[c]! - lmax);
    const logq = lmax + Math.log(sq);
    const crit = problem.criterion(x);
    crits[m] = crit;
    const lw = Number.isFinite(crit) ? -(crit - best.crit) / 2 - logq : -Infinity;
    logw[m] = lw;
    if (lw > maxLw) maxLw = lw;
  }
  let sw = 0;
  let sw2 = 0;
  const w = new Float64Array(M);
  for (let m = 0; m < M; m++) {
    const v = Math.exp(logw[m]! - maxLw);
    w[m] = v;
    sw += v;
    sw2 += v * v;
  }
  const ess = sw > 0 ? (sw * sw) / sw2 : 0;
  // Systematic resampling into particles, then a few random-walk Metropolis moves per particle
  // (resample–move, Gilks & Berzuini 2001, JRSS B 63:127–146) so that repeated proposals become
  // distinct draws; each move leaves the target (likelihood × flat prior on log-parameters) invariant.
  const px = new Float64Array(nSamples * k);
  const pc = new Float64Array(nSamples);
  const u0 = rng.next() / nSamples;
  let cum = 0;
  let m = 0;
  for (let s = 0; s < nSamples; s++) {
    const target = (u0 + s / nSamples) * sw;
    while (m < M - 1 && cum + w[m]! < target) {
      cum += w[m]!;
      m++;
    }
    for (let i = 0; i < k; i++) px[s * k + i] = xs[m * k + i]!;
    pc[s] = crits[m]!;
  }
  const Lrw = cholesky(cov.map((v) => (v * 2.38 * 2.38) / k / 4), k);
  if (Lrw) {
    for (let s = 0; s < nSamples; s++) {
      for (let move = 0; move < MOVES; move++) {
        for (let i = 0; i < k; i++) zv[i] = rng.normal();
        for (let i = 0; i < k; i++) {
          let v = px[s * k + i]!;
          for (let j = 0; j <= i; j++) v += Lrw[i * k + j]! * zv[j]!;
          x[i] = v;
        }
        const crit = problem.criterion(x);
        if (Number.isFinite(crit) && Math.log(rng.next()) < -(crit - pc[s]!) / 2) {
          for (let i = 0; i < k; i++) px[s * k + i] = x[i]!;
          pc[s] = crit;
        }
      }
    }
  }
  const samples: FitSample[] = [];
  const names = problem.input.estimate;
  const base = problem.input;
  for (let s = 0; s < nSamples; s++) {
    const d: FitSample = { beta: base.params.beta, gamma: base.params.gamma, I0: base.initial.I };
    if (base.model === 'SEIR') d.sigma = base.params.sigma;
    for (let i = 0; i < k; i++) d[names[i]!] = Math.exp(px[s * k + i]!);
    samples.push(d);
  }
  return { samples, ess };
}
