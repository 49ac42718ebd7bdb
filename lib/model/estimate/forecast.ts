/**
 * From a Fit to what the screens show: the fitted curve against the data, and a forecast ensemble
 * over the Fit's parameter draws (run by the engine's ensembleFromSamples).
 */
import { ensembleFromSamples } from '../ensemble';
import { largestSafeStep } from '../simulate';
import type { EnsembleResult, IntegrationMethod, ParamSample, ProgressCallback, ScenarioInput } from '../types';
import type { FitResult, FitSample } from './fit';
import { createRng } from './random';
import { TrajectoryEvaluator } from './trajectory';

export interface FitCurve {
  /** Observed days, days since day 0. */
  day: number[];
  /** Observed counts, people. */
  observed: number[];
  /** Model values on those days, people. */
  fitted: number[];
  /** Pearson (y − μ)/√μ for a Poisson fit, raw y − μ (people) for least squares. */
  residual: number[];
  residualKind: 'pearson' | 'raw';
  /** The fitted curve on every whole day 0..last observed day, for drawing. */
  trajectory: { t: Float64Array; value: Float64Array };
}

/** Fitted trajectory of a Fit on the observed days, with residuals, and on every day for the line. */
export function fitCurve(fit: FitResult): FitCurve {
  const inp = fit.input;
  const ev = new TrajectoryEvaluator(inp.model, inp.population, inp.initial.E, inp.initial.R, inp.method, inp.step);
  const lastDay = inp.observed.day[inp.observed.day.length - 1]!;
  const value = new Float64Array(lastDay + 1);
  const prev = inp.observe === 'prevalence';
  ev.run(
    {
      beta: fit.params.beta,
      gamma: fit.params.gamma,
      sigma: fit.params.sigma ?? inp.params.sigma,
      omega: fit.params.omega ?? inp.params.omega,
      I0: fit.initial.I,
    },
    lastDay,
    prev ? value : null,
    prev ? null : value,
  );
  const fitted = inp.observed.day.map((d) => value[d]!);
  const poisson = inp.likelihood === 'poisson';
  const residual = inp.observed.value.map((y, i) => {
    const m = fitted[i]!;
    return poisson ? (y - m) / Math.sqrt(Math.max(m, 1e-12)) : y - m;
  });
  const t = new Float64Array(lastDay + 1);
  for (let d = 0; d <= lastDay; d++) t[d] = d;
  return {
    day: inp.observed.day.slice(),
    observed: inp.observed.value.slice(),
    fitted,
    residual,
    residualKind: poisson ? 'pearson' : 'raw',
    trajectory: { t, value },
  };
}

/** What a forecast adds to a Fit: the horizon and the scenario around it. */
export interface ForecastBase {
  /** Horizon, whole days from day 0 (should reach past the data). */
  days: number;
  capacity?: ScenarioInput['capacity'];
  interventions?: ScenarioInput['interventions'];
  vaccination?: ScenarioInput['vaccination'];
  /** Default: the Fit's method. */
  method?: IntegrationMethod;
  /** Days; default the Fit's step. Lowered for all runs if a draw needs a smaller safe step. */
  step?: number;
  /** dopri5 only, fraction. */
  tolerance?: number;
}

export interface ForecastResult extends EnsembleResult {
  /** Step used by every run, days (≤ base.step: see ForecastBase.step). */
  step: number;
  /** Last observed day of the Fit, days: the data cut-off to draw on the chart. */
  dataUntil: number;
  /** How many distinct Fit draws fed the runs. */
  distinctSamples: number;
}

/**
 * `runs` Runs of the fitted model, one per parameter draw of the Fit (a seeded subset of
 * fit.samples, or draws with replacement when runs exceeds them), with the base scenario's
 * horizon, interventions, vaccination and capacity; reduced to p5..p95 bands of incidence,
 * prevalence and bed demand, and the peak day / size and first day over capacity with their ranges
 * (see EnsembleResult). A Fit without samples gives `runs` copies of the point estimate.
 */
export function forecastFromFit(
  fit: FitResult,
  base: ForecastBase,
  runs: number,
  seed: number,
  onProgress?: ProgressCallback,
): ForecastResult {
  const inp = fit.input;
  const pool: FitSample[] =
    fit.samples.length > 0
      ? fit.samples
      : [{ beta: fit.params.beta, gamma: fit.params.gamma, sigma: fit.params.sigma, I0: fit.initial.I }];
  const rng = createRng(seed);
  const chosen: FitSample[] = [];
  if (runs <= pool.length) {
    // Partial Fisher–Yates: a seeded subset without repeats.
    const idx = Array.from(pool.keys());
    for (let i = 0; i < runs; i++) {
      const j = i + Math.floor(rng.next() * (idx.length - i));
      const tmp = idx[i]!;
      idx[i] = idx[j]!;
      idx[j] = tmp;
      chosen.push(pool[idx[i]!]!);
    }
  } else {
    for (let i = 0; i < runs; i++) chosen.push(pool[Math.floor(rng.next() * pool.length)]!);
  }
  const distinctSamples = new Set(chosen).size;

  const input: ScenarioInput = {
    model: inp.model,
    population: inp.population,
    initial: { I: fit.initial.I, ...(inp.model === 'SEIR' ? { E: inp.initial.E } : {}), ...(inp.initial.R > 0 ? { R: inp.initial.R } : {}) },
    params: {
      beta: fit.params.beta,
      gamma: fit.params.gamma,
      ...(inp.model === 'SEIR' ? { sigma: fit.params.sigma ?? inp.params.sigma } : {}),
      ...(inp.model === 'SIRS' ? { omega: fit.params.omega ?? inp.params.omega } : {}),
    },
    method: base.method ?? inp.method,
    step: base.step ?? inp.step,
    days: base.days,
    record: 'daily',
    ...(base.capacity ? { capacity: base.capacity } : {}),
    ...(base.interventions ? { interventions: base.interventions } : {}),
    ...(base.vaccination ? { vaccination: base.vaccination } : {}),
    ...(base.tolerance !== undefined ? { tolerance: base.tolerance } : {}),
  };
  const samples: ParamSample[] = chosen.map((s) => {
    const p: Record<string, number> = { 'params.beta': s.beta, 'params.gamma': s.gamma, 'initial.I': s.I0 };
    if (inp.model === 'SEIR' && s.sigma !== undefined) p['params.sigma'] = s.sigma;
    return p;
  });
  // The engine refuses an unsafe fixed step rather than clamping; pick one step that every draw accepts.
  let step = input.step;
  if (input.method !== 'dopri5') {
    for (const s of chosen) {
      const safe = largestSafeStep({
        ...input,
        params: { ...input.params, beta: s.beta, gamma: s.gamma, ...(s.sigma !== undefined && inp.model === 'SEIR' ? { sigma: s.sigma } : {}) },
      });
      if (safe < step) step = safe;
    }
    if (step < input.step) step = 1 / Math.ceil(1 / (0.999 * step)); // a whole number of steps per day
  }
  const result = ensembleFromSamples({ ...input, step }, samples, onProgress);
  return { ...result, step, dataUntil: inp.observed.day[inp.observed.day.length - 1]!, distinctSamples };
}
