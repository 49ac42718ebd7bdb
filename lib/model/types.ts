/**
 * Result shapes of the engine. All series are Float64Arrays on the same output times `t`, so they can be
 * transferred (not copied) out of a Web Worker.
 */
export type { ScenarioInput, ModelKind, IntegrationMethod, Intervention } from '../validation/scenario';

export interface RunWarning {
  code: 'negative_compartment' | 'peak_at_horizon';
  message: string;
}

/** One computed result of a Scenario. Compartments in people, t in days since t = 0. */
export interface Run {
  /** Output times, days: every whole day 0..days (record 'daily') or every step (record 'step'). */
  t: Float64Array;
  /** Susceptible, people. */
  S: Float64Array;
  /** Exposed (latent), people; SEIR only. */
  E?: Float64Array;
  /** Infectious, people. */
  I: Float64Array;
  /** Removed (recovered), people. */
  R: Float64Array;
  /** Vaccinated (immune, does not wane), people; only when the scenario vaccinates. */
  V?: Float64Array;
  /**
   * New infections (the S→I flow, or S→E for SEIR), people, in the output interval ending at t[k]:
   * the integrated flow from t[k−1] to t[k]. incidence[0] = 0 (no interval ends at t = 0).
   */
  incidence: Float64Array;
  warnings: RunWarning[];
}

/** Headline figures of a Run. */
export interface Summary {
  /** Basic reproduction number β/γ (for SEIR too: every exposed person becomes infectious). */
  R0: number;
  /** Effective reproduction number on run.t: R0 · contact factor(t) · S(t)/N. */
  Rt: Float64Array;
  /** Time of the largest I, days, located on the integration steps and refined by a cubic Hermite fit. */
  peakDay: number;
  /** Largest I, people (same refinement). */
  peakInfectious: number;
  /**
   * People infected at some time up to the horizon: initial I + E plus all new infections (the
   * integrated S→I / S→E flow). For SIRS a reinfected person counts once per infection.
   */
  finalSize: number;
  /** finalSize / N, fraction. */
  attackRate: number;
  /** 1 − 1/R0 (0 when R0 ≤ 1), fraction of N that must be immune. */
  herdImmunityThreshold: number;
  /** Early exponential growth rate r from the linearisation at t = 0 (contact factor at t = 0), per day. */
  growthRate: number;
  /** ln 2 / r, days; null when the outbreak does not grow (r ≤ 0). */
  doublingTime: number | null;
  /**
   * Occupied beds, beds, on run.t (with capacity only). First-order outflow:
   * dB/dt = admissionFraction · (new-infection rate) − B / lengthOfStay, B(0) = 0, with the admissions of
   * each output interval spread evenly over it (exact for that piecewise-constant inflow).
   */
  bedDemand?: Float64Array;
  /** First output time, days, at which bedDemand exceeds beds; null if never (with capacity only). */
  bedsExceededDay?: number | null;
}

/** The five percentiles every band carries (linear interpolation between order statistics). */
export interface Percentiles<T> {
  p5: T;
  p25: T;
  p50: T;
  p75: T;
  p95: T;
}

/** [low, high] for a parameter path such as 'params.beta' or 'interventions.0.contactReduction'. */
export type ParamRanges = Readonly<Record<string, readonly [number, number]>>;

/** One explicit parameter set: path → value (e.g. a draw from a Fit's uncertainty). */
export type ParamSample = Readonly<Record<string, number>>;

export type ProgressCallback = (done: number, total: number) => void;

export interface EnsembleResult {
  /** Output times, days (whole days 0..days). */
  t: Float64Array;
  bands: {
    /** Infectious, people. */
    I: Percentiles<Float64Array>;
    /** New infections per day, people. */
    incidence: Percentiles<Float64Array>;
    /** Occupied beds (with capacity only). */
    bedDemand?: Percentiles<Float64Array>;
  };
  /** days */
  peakDay: Percentiles<number>;
  /** people */
  peakInfectious: Percentiles<number>;
  /**
   * First day beds are exceeded (with capacity only). A run that never exceeds counts as +Infinity, so
   * p50 = Infinity means most runs stay within beds. `share` = fraction of runs that exceed.
   */
  bedsExceededDay?: Percentiles<number> & { share: number };
  /** Number of runs. */
  runs: number;
}
