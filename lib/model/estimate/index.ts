/**
 * Estimation from an outbreak's counts: early growth rate, Rt over time, calibration (Fit) with
 * uncertainty, forecasts from a Fit. Re-exported by lib/model/index.ts.
 */
export { growthRate, R0FromGrowth, doublingTimeOf, doublingIntervalOf } from './growth';
export type { GrowthWindow, GrowthOptions, GrowthResult, GrowthModel } from './growth';
export { estimateRt, discretiseSerialInterval } from './rt';
export type { RtOptions, RtEstimate, SerialIntervalSpec, SerialIntervalDiscretisation } from './rt';
export { fitScenario, FIT_PARAMS } from './fit';
export type {
  FitInput, FitOptions, FitResult, FitFlag, FitFlagCode, FitSample, FitParamName, FitIntervalName,
  FitObservation, FitLikelihood, ResolvedFitInput,
} from './fit';
export { fitCurve, forecastFromFit } from './forecast';
export type { FitCurve, ForecastBase, ForecastResult } from './forecast';
export { gammaP, gammaQ, gammaCdf, gammaQuantile, chiSquareQuantile, normalQuantile, normalCdf, lnGamma } from './special';
export { createRng, quantileSorted, type Rng as SeededRng } from './random';
