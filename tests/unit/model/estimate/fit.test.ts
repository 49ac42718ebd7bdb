import { describe, expect, it } from 'vitest';
import { simulate, type ScenarioInput } from '@/lib/model';
import { fitScenario, type FitInput } from '@/lib/model/estimate/fit';
import { TrajectoryEvaluator } from '@/lib/model/estimate/trajectory';
import { createRng } from '@/lib/model/estimate/random';
import { chiSquareQuantile } from '@/lib/model/estimate/special';
import { nelderMead } from '@/lib/model/optim/nelder-mead';
import boarding from '@/tests/fixtures/boarding-school-1978.json';

describe('fit trajectories are the engine’s', () => {
  // [calc] same kernels, same step sequence: the fit's inner loop must reproduce simulate() to round-off
  const cases: [ScenarioInput['model'], 'rk4' | 'euler', number][] = [
    ['SIR', 'rk4', 0.5],
    ['SEIR', 'rk4', 0.3],
    ['SIRS', 'rk4', 0.25],
    ['SIR', 'euler', 0.2],
  ];
  it.each(cases)('%s %s h = %f', (model, method, step) => {
    const input: ScenarioInput = {
      model,
      population: 5000,
      initial: { I: 3, ...(model === 'SEIR' ? { E: 4 } : {}), R: 10 },
      params: { beta: 0.7, gamma: 0.3, ...(model === 'SEIR' ? { sigma: 0.4 } : {}), ...(model === 'SIRS' ? { omega: 0.01 } : {}) },
      method,
      step,
      days: 90,
    };
    const run = simulate(input);
    const ev = new TrajectoryEvaluator(model, 5000, model === 'SEIR' ? 4 : 0, 10, method, step);
    const prev = new Float64Array(91);
    const inc = new Float64Array(91);
    expect(ev.run({ beta: 0.7, gamma: 0.3, sigma: 0.4, omega: 0.01, I0: 3 }, 90, prev, null)).toBe(true);
    ev.run({ beta: 0.7, gamma: 0.3, sigma: 0.4, omega: 0.01, I0: 3 }, 90, null, inc);
    for (let d = 0; d <= 90; d++) {
      expect(Math.abs(prev[d]! - run.I[d]!)).toBeLessThan(1e-9);
      expect(Math.abs(inc[d]! - run.incidence[d]!)).toBeLessThan(1e-9);
    }
  });
});

describe('fitScenario on the 1978 boarding-school outbreak', () => {
  // [pub] BMJ 1978 1:587 (data, REFERENCES.md §6); published fits [mem]: Murray β ≈ 1.66/day,
  // 1/γ ≈ 2.27 days, R0 ≈ 3.77; Keeling & Rohani β = 1.66/day, 1/γ = 2.2 days, R0 ≈ 3.65.
  const fit = fitScenario({
    model: 'SIR',
    population: boarding.population,
    initial: { I: boarding.initialInfectious },
    observed: { day: boarding.day, value: boarding.inBed },
    observe: 'prevalence',
    estimate: ['beta', 'gamma'],
    likelihood: 'leastSquares',
  });
  it('lands near the published β, 1/γ and R0', () => {
    console.log(
      `boarding school: β = ${fit.params.beta.toFixed(4)}/day [${fit.interval.beta!.map((v) => v.toFixed(4)).join(', ')}], ` +
        `1/γ = ${fit.infectiousPeriod.toFixed(3)} d [${fit.interval.infectiousPeriod!.map((v) => v.toFixed(3)).join(', ')}], ` +
        `R0 = ${fit.R0.toFixed(3)} [${fit.interval.R0!.map((v) => v.toFixed(3)).join(', ')}], SSE = ${fit.objective.toFixed(1)}`,
    );
    expect(fit.converged).toBe(true);
    expect(fit.R0).toBeGreaterThan(3.5);
    expect(fit.R0).toBeLessThan(3.9);
    expect(fit.infectiousPeriod).toBeGreaterThan(2.0);
    expect(fit.infectiousPeriod).toBeLessThan(2.4);
    expect(fit.params.beta).toBeGreaterThan(1.55);
    expect(fit.params.beta).toBeLessThan(1.8);
    expect(fit.flags).toEqual([]);
  });
  it('profile intervals sit where n·ln(SSE/SSE_min) = χ²₁(0.95), re-optimising γ independently', () => {
    // [calc] the Gaussian profile likelihood with σ² estimated: −2 log L = n ln SSE + const
    const n = boarding.day.length;
    const cut = chiSquareQuantile(0.95, 1);
    expect(cut).toBeCloseTo(3.841459, 6);
    const sseAt = (beta: number) => {
      const ev = new TrajectoryEvaluator('SIR', 763, 0, 0, 'rk4', 0.5);
      const prev = new Float64Array(15);
      const sse = (lg: Float64Array) => {
        if (!ev.run({ beta, gamma: Math.exp(lg[0]!), sigma: 0, omega: 0, I0: 1 }, 14, prev, null)) return Infinity;
        let s = 0;
        boarding.day.forEach((d, i) => (s += (boarding.inBed[i]! - prev[d]!) ** 2));
        return s;
      };
      return nelderMead(sse, [Math.log(fit.params.gamma)], { step: 0.05, xTol: 1e-10, fTol: 1e-10 }).fx;
    };
    for (const end of fit.interval.beta!) {
      expect(Math.abs(n * Math.log(sseAt(end) / fit.objective) - cut)).toBeLessThan(0.02);
    }
    expect(fit.interval.beta![0]).toBeLessThan(fit.params.beta);
    expect(fit.interval.beta![1]).toBeGreaterThan(fit.params.beta);
  });
  it('returns samples whose R0 quantiles agree with the profile interval', () => {
    // [cp] flat-prior posterior vs profile likelihood: close for a near-normal likelihood
    const r0 = fit.samples.map((s) => s.beta / s.gamma).sort((a, b) => a - b);
    expect(r0.length).toBe(1000);
    const [lo, hi] = fit.interval.R0!;
    const width = hi - lo;
    expect(Math.abs(r0[25]! - lo)).toBeLessThan(0.15 * width);
    expect(Math.abs(r0[974]! - hi)).toBeLessThan(0.15 * width);
    expect(fit.samplesEffective).toBeGreaterThan(300);
  });
});

/** Poisson counts around an engine run (seeded). */
function syntheticIncidence(seed: number, run: { incidence: Float64Array }, days: number) {
  const rng = createRng(seed);
  const day = Array.from({ length: days }, (_, i) => i + 1);
  return { day, value: day.map((d) => rng.poisson(run.incidence[d]!)) };
}

describe('parameter recovery', () => {
  const truth = { beta: 0.6, gamma: 0.25, I0: 5 };
  const N = 20000;
  const run = simulate({ model: 'SIR', population: N, initial: { I: truth.I0 }, params: { beta: 0.6, gamma: 0.25 }, method: 'rk4', step: 0.05, days: 60 });

  it('recovers the parameters from noise-free counts', () => {
    // [calc] data from the engine at h = 0.05; the fit integrates at h = 0.5 — the gap is RK4's error
    const day = Array.from({ length: 50 }, (_, i) => i + 1);
    const fit = fitScenario({
      model: 'SIR', population: N, initial: { I: 1 }, observed: { day, value: day.map((d) => run.incidence[d]!) },
      observe: 'incidence', estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson', options: { samples: 0 },
    });
    expect(fit.params.beta).toBeCloseTo(truth.beta, 3);
    expect(fit.params.gamma).toBeCloseTo(truth.gamma, 3);
    expect(fit.initial.I).toBeCloseTo(truth.I0, 1);
    expect(fit.objective).toBeLessThan(0.01);
  });

  it('95% profile intervals cover the truth in ≥ 90% of 50 Poisson data sets, per parameter', () => {
    // [cp] frequentist coverage by simulation; 50 seeds → binomial sd ≈ 3 points around 95%
    const cover = { beta: 0, gamma: 0, I0: 0, R0: 0 };
    const seeds = 50;
    for (let s = 1; s <= seeds; s++) {
      const fit = fitScenario({
        model: 'SIR', population: N, initial: { I: 2 }, observed: syntheticIncidence(1000 + s, run, 50),
        observe: 'incidence', estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson', options: { samples: 0 },
      });
      const iv = fit.interval;
      const inside = (v: number, r: [number, number] | undefined) => (r && r[0] <= v && v <= r[1] ? 1 : 0);
      cover.beta += inside(truth.beta, iv.beta);
      cover.gamma += inside(truth.gamma, iv.gamma);
      cover.I0 += inside(truth.I0, iv.I0);
      cover.R0 += inside(truth.beta / truth.gamma, iv.R0);
    }
    const pct = Object.fromEntries(Object.entries(cover).map(([k, v]) => [k, (100 * v) / seeds]));
    console.log(`coverage of 95% intervals over ${seeds} seeds (%):`, pct);
    for (const v of Object.values(cover)) expect(v / seeds).toBeGreaterThanOrEqual(0.9);
  });

  it('SEIR with σ fixed: β and γ recovered and covered', () => {
    const seir = simulate({ model: 'SEIR', population: 50000, initial: { I: 0, E: 20 }, params: { beta: 0.5, gamma: 0.25, sigma: 0.2 }, method: 'rk4', step: 0.05, days: 80 });
    const cover = { beta: 0, gamma: 0 };
    const seeds = 20;
    for (let s = 1; s <= seeds; s++) {
      const fit = fitScenario({
        model: 'SEIR', population: 50000, initial: { I: 0, E: 20 }, params: { sigma: 0.2 },
        observed: syntheticIncidence(s, seir, 75), observe: 'incidence', estimate: ['beta', 'gamma'], likelihood: 'poisson',
        options: { samples: 0 },
      });
      if (fit.interval.beta![0] <= 0.5 && 0.5 <= fit.interval.beta![1]) cover.beta++;
      if (fit.interval.gamma![0] <= 0.25 && 0.25 <= fit.interval.gamma![1]) cover.gamma++;
      expect(fit.converged).toBe(true);
    }
    expect(cover.beta / seeds).toBeGreaterThanOrEqual(0.85);
    expect(cover.gamma / seeds).toBeGreaterThanOrEqual(0.85);
  });

  it('RK4 at h = 0.5 day moves the estimates by < 5% of their interval half-width vs h = 0.05', () => {
    // [calc] accuracy of the default fitting step against a fine one, on the same noisy data
    const observed = syntheticIncidence(7, run, 50);
    const base: FitInput = {
      model: 'SIR', population: N, initial: { I: 2 }, observed, observe: 'incidence',
      estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson', options: { samples: 0 },
    };
    const coarse = fitScenario({ ...base, step: 0.5 });
    const fine = fitScenario({ ...base, step: 0.05 });
    for (const [name, a, b] of [
      ['beta', coarse.params.beta, fine.params.beta],
      ['gamma', coarse.params.gamma, fine.params.gamma],
      ['I0', coarse.initial.I, fine.initial.I],
    ] as const) {
      const iv = fine.interval[name]!;
      expect(Math.abs(a - b)).toBeLessThan(0.05 * ((iv[1] - iv[0]) / 2));
    }
  });
});

describe('fit diagnostics', () => {
  const run = simulate({ model: 'SIR', population: 20000, initial: { I: 5 }, params: { beta: 0.6, gamma: 0.25 }, method: 'rk4', step: 0.1, days: 60 });

  it('residuals are Pearson residuals and the objective is the Poisson deviance', () => {
    // [pub] McCullagh & Nelder, Generalized Linear Models (1989): deviance 2Σ[y ln(y/μ) − (y − μ)],
    // Pearson residual (y − μ)/√μ [mem]
    const observed = syntheticIncidence(3, run, 40);
    const fit = fitScenario({ model: 'SIR', population: 20000, initial: { I: 3 }, observed, observe: 'incidence', estimate: ['beta', 'I0'], likelihood: 'poisson', params: { gamma: 0.25 }, options: { samples: 0 } });
    let dev = 0;
    observed.value.forEach((y, i) => {
      const m = fit.fitted[i]!;
      dev += 2 * ((y > 0 ? y * Math.log(y / m) : 0) - (y - m));
      expect(fit.residuals[i]).toBeCloseTo((y - m) / Math.sqrt(m), 10);
    });
    expect(fit.objective).toBeCloseTo(dev, 8);
    expect(fit.interval.gamma).toBeUndefined();
    // R0 interval follows β's when γ is fixed
    expect(fit.interval.R0![0]).toBeCloseTo(fit.interval.beta![0] / 0.25, 10);
  });

  it('flags few informative days and data that stop before the peak', () => {
    const fit = fitScenario({
      model: 'SIR', population: 20000, initial: { I: 5 }, params: { gamma: 0.25 },
      observed: { day: [1, 2, 3, 4, 5, 6, 7, 8], value: [0, 2, 0, 3, 4, 0, 6, 9] },
      observe: 'incidence', estimate: ['beta'], likelihood: 'poisson', options: { samples: 0 },
    });
    const codes = fit.flags.map((f) => f.code);
    expect(codes).toContain('few_informative_days');
    expect(codes).toContain('before_peak');
  });

  it('flags a fitted peak after the data even when the largest count is not the last', () => {
    const observed = syntheticIncidence(11, run, 20); // the true peak of incidence is near day 28
    // swap the last two counts so that the largest is not the last one
    const n = observed.value.length;
    const [a, b] = [observed.value[n - 2]!, observed.value[n - 1]!];
    observed.value[n - 2] = Math.max(a, b) + 1;
    observed.value[n - 1] = Math.min(a, b);
    const fit = fitScenario({ model: 'SIR', population: 20000, initial: { I: 5 }, observed, observe: 'incidence', estimate: ['beta', 'gamma'], likelihood: 'poisson', options: { samples: 0 } });
    expect(fit.flags.map((f) => f.code)).toContain('before_peak');
  });

  it('does not flag a well-observed wave', () => {
    const fit = fitScenario({ model: 'SIR', population: 20000, initial: { I: 5 }, observed: syntheticIncidence(5, run, 50), observe: 'incidence', estimate: ['beta', 'gamma'], likelihood: 'poisson', options: { samples: 0 } });
    expect(fit.flags).toEqual([]);
  });

  it('flags a fit stopped by its evaluation cap as not converged', () => {
    const fit = fitScenario({
      model: 'SIR', population: 20000, initial: { I: 5 }, observed: syntheticIncidence(5, run, 50), observe: 'incidence',
      estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson', params: { beta: 3, gamma: 1 },
      options: { samples: 0, restarts: 0, maxEvaluations: 8, intervals: 'none' },
    });
    expect(fit.converged).toBe(false);
    expect(fit.flags.map((f) => f.code)).toContain('not_converged');
  });

  it('flags over-dispersed counts', () => {
    const observed = syntheticIncidence(9, run, 50);
    observed.value = observed.value.map((v, i) => Math.round(v * (i % 2 ? 1.6 : 0.4)));
    const fit = fitScenario({ model: 'SIR', population: 20000, initial: { I: 5 }, observed, observe: 'incidence', estimate: ['beta', 'gamma'], likelihood: 'poisson', options: { samples: 0 } });
    expect(fit.flags.map((f) => f.code)).toContain('overdispersed');
  });

  it('rejects malformed input with the field named', () => {
    const ok: FitInput = { model: 'SIR', population: 100, initial: { I: 1 }, observed: { day: [1, 2, 3], value: [1, 2, 3] }, observe: 'incidence', estimate: ['beta'], likelihood: 'poisson' };
    expect(() => fitScenario({ ...ok, observed: { day: [1, 1, 2], value: [1, 2, 3] } })).toThrow(/observed.day.1/);
    expect(() => fitScenario({ ...ok, observed: { day: [0, 1, 2], value: [1, 2, 3] } })).toThrow(/observed.day.0/);
    expect(() => fitScenario({ ...ok, estimate: ['sigma'] })).toThrow(/sigma exists only in SEIR/);
    expect(() => fitScenario({ ...ok, estimate: [] })).toThrow(/estimate/);
    expect(() => fitScenario({ ...ok, observed: { day: [1, 2, 3], value: [1, -2, 3] } })).toThrow(/observed.value.1/);
  });
});
