/**
 * Public API of the forecasting engine (pure TypeScript: runs in the forecast worker, on the server
 * and in tests). Import from '@/lib/model' only.
 *
 *   simulate(input)            → Run        integrate one Scenario (throws ModelError)
 *   summarize(run, input)      → Summary    headline figures: R0, Rt, peak, final size, growth, beds
 *   finalSize(R0)              → number     final attack rate z of z = 1 − exp(−R0·z), fraction
 *   ensemble(input, ranges, runs, seed, onProgress?)   → EnsembleResult  (Latin hypercube)
 *   ensembleFromSamples(input, samples, onProgress?)   → EnsembleResult  (explicit draws)
 */
export { simulate, parseScenarioInput, largestSafeStep, contactFactor, RK4_STABILITY } from './simulate';
export { summarize, finalSize, finalSusceptible, growthRate, bedDemand } from './summary';
export { ensemble, ensembleFromSamples, ENSEMBLE_PATH, MAX_RUNS } from './ensemble';
export { ModelError, type ModelErrorCode, type ModelErrorData } from './errors';
export { mulberry32, latinHypercube } from './random';
export type {
  Run,
  RunWarning,
  Summary,
  EnsembleResult,
  Percentiles,
  ParamRanges,
  ParamSample,
  ProgressCallback,
  ScenarioInput,
  ModelKind,
  IntegrationMethod,
  Intervention,
} from './types';
export { scenarioInputSchema, MAX_DAYS, MAX_STEPS } from '../validation/scenario';

// --- estimation (lib/model/estimate) ---
// growthRate(incidence, window) is exported as growthRateFromCounts here because the name growthRate
// is taken above by the engine's summary helper; '@/lib/model/estimate' exports it as growthRate.
export { growthRate as growthRateFromCounts, R0FromGrowth, doublingTimeOf, doublingIntervalOf } from './estimate/growth';
export type { GrowthWindow, GrowthOptions, GrowthResult, GrowthModel } from './estimate/growth';
export { estimateRt, discretiseSerialInterval } from './estimate/rt';
export type { RtOptions, RtEstimate, SerialIntervalSpec, SerialIntervalDiscretisation } from './estimate/rt';
export { fitScenario, FIT_PARAMS } from './estimate/fit';
export type {
  FitInput, FitOptions, FitResult, FitFlag, FitFlagCode, FitSample, FitParamName, FitIntervalName,
  FitObservation, FitLikelihood, ResolvedFitInput,
} from './estimate/fit';
export { fitCurve, forecastFromFit } from './estimate/forecast';
export type { FitCurve, ForecastBase, ForecastResult } from './estimate/forecast';
export { gammaQuantile, chiSquareQuantile, normalQuantile } from './estimate/special';
