/**
 * Estimation benchmarks: a fit of β, γ and I0 (with profile intervals and 1000 samples) to 120 days of
 * Poisson incidence, and a 1,000-run forecast ensemble from that fit. Median of a few repeats.
 */
import { simulate } from '../lib/model';
import { createRng, estimateRt, fitScenario, forecastFromFit, type FitInput } from '../lib/model/estimate';
import type { BenchRow } from './types';

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

function time<T>(fn: () => T): [number, T] {
  const t0 = performance.now();
  const v = fn();
  return [performance.now() - t0, v];
}

export default async function bench(): Promise<BenchRow[]> {
  const N = 100_000;
  const truth = simulate({ model: 'SIR', population: N, initial: { I: 10 }, params: { beta: 0.3, gamma: 0.15 }, method: 'rk4', step: 0.1, days: 130 });
  const rng = createRng(2024);
  const day = Array.from({ length: 120 }, (_, i) => i + 1);
  const observed = { day, value: day.map((d) => rng.poisson(truth.incidence[d]!)) };
  const input: FitInput = {
    model: 'SIR', population: N, initial: { I: 3 }, observed, observe: 'incidence',
    estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson',
  };
  // Warm-up (JIT) then timed repeats.
  fitScenario(input);
  const fitTimes: number[] = [];
  const noIntervalTimes: number[] = [];
  let fit = fitScenario(input);
  let evals = 0;
  for (let i = 0; i < 5; i++) {
    const [ms, f] = time(() => fitScenario(input));
    fitTimes.push(ms);
    fit = f;
    evals = f.evaluations;
    noIntervalTimes.push(time(() => fitScenario({ ...input, options: { intervals: 'none', samples: 0 } }))[0]);
  }
  const base = { days: 240, capacity: { admissionFraction: 0.02, lengthOfStay: 8, beds: 300 } };
  forecastFromFit(fit, base, 100, 1);
  const fcTimes: number[] = [];
  for (let i = 0; i < 3; i++) fcTimes.push(time(() => forecastFromFit(fit, base, 1000, i + 1))[0]);
  const rtTimes: number[] = [];
  const series = Array.from(truth.incidence);
  for (let i = 0; i < 5; i++) rtTimes.push(time(() => estimateRt(series, { siMean: 6.7, siSd: 4 }))[0]);
  const perEval = (median(fitTimes) * 1000) / evals;
  return [
    { name: 'estimate: fit β,γ,I0 to 120 days (intervals + 1000 samples)', value: median(fitTimes), unit: 'ms', target: '≤ 300 ms' },
    { name: 'estimate: same fit, point estimate only', value: median(noIntervalTimes), unit: 'ms' },
    { name: 'estimate: criterion evaluations per fit', value: evals, unit: 'count' },
    { name: 'estimate: time per evaluation (120 days, RK4 h=0.5)', value: perEval, unit: 'µs' },
    { name: 'estimate: forecast 1000 runs × 240 days from the fit', value: median(fcTimes), unit: 'ms', target: '≤ 1000 ms' },
    { name: 'estimate: Rt (Cori) over 130 days', value: median(rtTimes), unit: 'ms' },
  ];
}
