import { describe, expect, it } from 'vitest';
import { simulate, summarize } from '@/lib/model';
import { fitScenario } from '@/lib/model/estimate/fit';
import { fitCurve, forecastFromFit } from '@/lib/model/estimate/forecast';
import { createRng } from '@/lib/model/estimate/random';

const N = 20000;
const truthInput = { model: 'SIR' as const, population: N, initial: { I: 5 }, params: { beta: 0.6, gamma: 0.25 }, method: 'rk4' as const, step: 0.1, days: 120 };
const truth = simulate(truthInput);
const rng = createRng(42);
const day = Array.from({ length: 18 }, (_, i) => i + 1); // data stop before the peak (I peaks near day 25)
const observed = { day, value: day.map((d) => rng.poisson(truth.incidence[d]!)) };
const fit = fitScenario({ model: 'SIR', population: N, initial: { I: 2 }, observed, observe: 'incidence', estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson' });
const capacity = { admissionFraction: 0.05, lengthOfStay: 7, beds: 150 };

describe('fitCurve', () => {
  it('returns the fitted values, Pearson residuals and a daily line through them', () => {
    const c = fitCurve(fit);
    expect(c.residualKind).toBe('pearson');
    c.day.forEach((d, i) => {
      expect(c.fitted[i]).toBeCloseTo(fit.fitted[i]!, 10);
      expect(c.trajectory.value[d]).toBeCloseTo(c.fitted[i]!, 12);
      // [pub] Pearson residual (y − μ)/√μ (McCullagh & Nelder 1989) [mem]
      expect(c.residual[i]).toBeCloseTo((c.observed[i]! - c.fitted[i]!) / Math.sqrt(c.fitted[i]!), 10);
    });
    expect(c.trajectory.t.length).toBe(19);
  });
});

describe('fit samples before the peak', () => {
  it('spread over the whole (curved) profile interval, not just the Laplace ellipse', () => {
    // [cp] the samples target the likelihood under a flat prior on log-parameters; with a nearly
    // flat profile their 2.5–97.5% range should match the profile interval in log scale
    for (const name of ['beta', 'gamma'] as const) {
      const v = fit.samples.map((s) => Math.log(s[name])).sort((a, b) => a - b);
      const [lo, hi] = fit.interval[name]!.map(Math.log) as [number, number];
      const width = hi - lo;
      expect(Math.abs(v[25]! - lo)).toBeLessThan(0.2 * width);
      expect(Math.abs(v[974]! - hi)).toBeLessThan(0.2 * width);
    }
    expect(new Set(fit.samples.map((s) => s.beta)).size).toBeGreaterThan(500);
  });
});

describe('forecastFromFit', () => {
  const fc = forecastFromFit(fit, { days: 120, capacity }, 400, 7);

  it('bands are ordered and the median follows the fitted curve on the data days', () => {
    for (const band of [fc.bands.incidence, fc.bands.I, fc.bands.bedDemand!]) {
      for (let k = 0; k < fc.t.length; k++) {
        expect(band.p5[k]!).toBeLessThanOrEqual(band.p25[k]! + 1e-9);
        expect(band.p25[k]!).toBeLessThanOrEqual(band.p50[k]! + 1e-9);
        expect(band.p50[k]!).toBeLessThanOrEqual(band.p75[k]! + 1e-9);
        expect(band.p75[k]!).toBeLessThanOrEqual(band.p95[k]! + 1e-9);
      }
    }
    const c = fitCurve(fit);
    for (const d of [10, 15, 18]) expect(Math.abs(fc.bands.incidence.p50[d]! / c.trajectory.value[d]! - 1)).toBeLessThan(0.1);
    expect(fc.runs).toBe(400);
    expect(fc.dataUntil).toBe(18);
    expect(fc.distinctSamples).toBeGreaterThan(300);
  });

  it('the 90% band holds the true (noise-free) curve on most future days', () => {
    // [cp] a forecast from a fit before the peak should bracket the process that made the data
    let inside = 0;
    let total = 0;
    for (let d = 19; d <= 80; d++) {
      total++;
      const v = truth.incidence[d]!;
      if (fc.bands.incidence.p5[d]! <= v && v <= fc.bands.incidence.p95[d]!) inside++;
    }
    expect(inside / total).toBeGreaterThan(0.8);
    const s = summarize(truth, truthInput);
    expect(fc.peakDay.p5).toBeLessThanOrEqual(s.peakDay);
    expect(fc.peakDay.p95).toBeGreaterThanOrEqual(s.peakDay);
    expect(fc.peakInfectious.p5).toBeLessThanOrEqual(s.peakInfectious);
    expect(fc.peakInfectious.p95).toBeGreaterThanOrEqual(s.peakInfectious);
  });

  it('reports the first day over capacity with its range and share of runs', () => {
    const ex = fc.bedsExceededDay!;
    expect(ex.share).toBeGreaterThan(0.5);
    expect(ex.p5).toBeLessThanOrEqual(ex.p50);
    const roomy = forecastFromFit(fit, { days: 120, capacity: { ...capacity, beds: 1e6 } }, 50, 7);
    expect(roomy.bedsExceededDay!.share).toBe(0);
    expect(roomy.bedsExceededDay!.p50).toBe(Infinity);
  });

  it('is reproducible from its seed and applies interventions from the base scenario', () => {
    const a = forecastFromFit(fit, { days: 60 }, 50, 3);
    const b = forecastFromFit(fit, { days: 60 }, 50, 3);
    expect(Array.from(a.bands.I.p50)).toEqual(Array.from(b.bands.I.p50));
    const cut = forecastFromFit(fit, { days: 60, interventions: [{ startDay: 19, contactReduction: 0.6 }] }, 50, 3);
    expect(cut.peakInfectious.p50).toBeLessThan(a.peakInfectious.p50);
  });

  it('lowers the step when a draw needs it instead of failing', () => {
    const fast = { ...fit, samples: fit.samples.map((s) => ({ ...s, beta: s.beta * 12 })) };
    const res = forecastFromFit(fast, { days: 30, step: 0.5 }, 20, 1);
    expect(res.step).toBeLessThan(0.5);
    expect(1 / res.step).toBeCloseTo(Math.round(1 / res.step), 9);
  });
});
