/**
 * Headline figures of a Run (see Summary in types.ts for the meaning and units of each).
 */
import { contactFactor, parseScenarioInput, peakOfRun, simulateParsed } from './simulate';
import type { Run, ScenarioInput, Summary } from './types';

/**
 * Final attack rate z (fraction) of an outbreak seeded by a vanishing number of infectious people in a
 * wholly susceptible population: the root in (0, 1) of z = 1 − exp(−R0·z) (Kermack & McKendrick 1927).
 * 0 when R0 ≤ 1. Newton's method from z = 1, which converges monotonically for this concave map.
 */
export function finalSize(R0: number): number {
  if (!(R0 > 1)) return 0;
  if (!Number.isFinite(R0)) return 1;
  let z = 1;
  for (let i = 0; i < 100; i++) {
    const e = Math.exp(-R0 * z);
    const g = z - 1 + e;
    const dg = 1 - R0 * e;
    const next = z - g / dg;
    if (Math.abs(next - z) <= 1e-15) return next;
    z = next;
  }
  return z;
}

/**
 * Final size with finite initial conditions, people still susceptible at the end (S∞): the root
 * S∞ ∈ (0, S0) of ln(S0/S∞) = (R0/N)(S0 + I0 − S∞), for SIR/SEIR without vaccination or waning
 * (I0 = all infected at t = 0, E included).
 */
export function finalSusceptible(R0: number, N: number, S0: number, I0: number): number {
  // g is convex with g(0+) = +∞ and g(S0) = −R0·I0/N < 0: exactly one root in (0, S0); bisect.
  if (!(I0 > 0) || !(S0 > 0)) return S0;
  const g = (x: number) => Math.log(S0 / x) - (R0 / N) * (S0 + I0 - x);
  let lo = Number.MIN_VALUE;
  let hi = S0;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) > 0) lo = mid;
    else hi = mid;
    if (hi - lo <= 1e-15 * hi) break;
  }
  return 0.5 * (lo + hi);
}

/**
 * Early exponential growth rate r, per day, from the linearisation about the state at t = 0:
 * SIR/SIRS r = βf·S0/N − γ; SEIR the dominant eigenvalue of [[−σ, βf·S0/N], [σ, −γ]],
 * r = [−(σ+γ) + √((σ−γ)² + 4σβf·S0/N)]/2 (f = contact factor at t = 0).
 */
export function growthRate(input: ScenarioInput, S0: number): number {
  const { beta, gamma, sigma } = input.params;
  const b = (beta * contactFactor(input, 0) * S0) / input.population;
  if (input.model === 'SEIR') {
    const s = sigma ?? 0;
    return (-(s + gamma) + Math.sqrt((s - gamma) * (s - gamma) + 4 * s * b)) / 2;
  }
  return b - gamma;
}

/**
 * Beds occupied on the output times: dB/dt = a·q(t) − B/L with q the new-infection rate taken constant
 * over each output interval (its integral is the interval's incidence), solved exactly per interval.
 */
export function bedDemand(t: Float64Array, incidence: Float64Array, admissionFraction: number, lengthOfStay: number): Float64Array {
  return bedDemandInto(new Float64Array(t.length), t, incidence, admissionFraction, lengthOfStay);
}

/** bedDemand written into `B` (length t.length, beds); returns B. Ensembles reuse one buffer. */
export function bedDemandInto(
  B: Float64Array,
  t: ArrayLike<number>,
  incidence: ArrayLike<number>,
  admissionFraction: number,
  lengthOfStay: number,
): Float64Array {
  B[0] = 0;
  for (let k = 1; k < t.length; k++) {
    const tau = (t[k] as number) - (t[k - 1] as number);
    const decay = Math.exp(-tau / lengthOfStay);
    const admitted = admissionFraction * (incidence[k] as number);
    // ∫ of inflow admitted/τ over the interval, each decaying with e^(−(τ−s)/L): admitted·L/τ·(1 − e^(−τ/L)).
    const inflow = tau > 0 ? ((admitted * lengthOfStay) / tau) * (1 - decay) : admitted;
    B[k] = (B[k - 1] as number) * decay + inflow;
  }
  return B;
}

/** Headline figures of a Run made from `input`. */
export function summarize(run: Run, input: ScenarioInput): Summary {
  const parsed = parseScenarioInput(input);
  let peak = peakOfRun.get(run);
  if (!peak) {
    // A Run that crossed postMessage lost its step-level peak; recompute it (same input → same steps).
    const again = simulateParsed(parsed);
    peak = again.peak;
    peakOfRun.set(run, peak);
  }
  return summarizeWithPeak(run, parsed, peak.day, peak.infectious);
}

/** summarize for an already validated input and a known peak (ensemble runs avoid re-validating). */
export function summarizeWithPeak(run: Run, input: ScenarioInput, peakDay: number, peakInfectious: number): Summary {
  const N = input.population;
  const R0 = input.params.beta / input.params.gamma;
  const n = run.t.length;
  const Rt = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    Rt[k] = (R0 * contactFactor(input, run.t[k] as number) * (run.S[k] as number)) / N;
  }
  let infections = 0;
  for (let k = 1; k < n; k++) infections += run.incidence[k] as number;
  const initialInfected = input.initial.I + (input.model === 'SEIR' ? (input.initial.E ?? 0) : 0);
  const final = initialInfected + infections;
  const r = growthRate(input, run.S[0] as number);
  const summary: Summary = {
    R0,
    Rt,
    peakDay,
    peakInfectious,
    finalSize: final,
    attackRate: final / N,
    herdImmunityThreshold: R0 > 1 ? 1 - 1 / R0 : 0,
    growthRate: r,
    doublingTime: r > 0 ? Math.LN2 / r : null,
  };
  if (input.capacity) {
    const B = bedDemand(run.t, run.incidence, input.capacity.admissionFraction, input.capacity.lengthOfStay);
    summary.bedDemand = B;
    let day: number | null = null;
    for (let k = 0; k < n; k++) {
      if ((B[k] as number) > input.capacity.beds) {
        day = run.t[k] as number;
        break;
      }
    }
    summary.bedsExceededDay = day;
  }
  return summary;
}
