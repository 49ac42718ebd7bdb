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
