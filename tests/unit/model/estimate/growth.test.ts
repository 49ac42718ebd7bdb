import { describe, expect, it } from 'vitest';
import { growthRate, R0FromGrowth } from '@/lib/model/estimate/growth';
import { createRng } from '@/lib/model/estimate/random';
import { simulate } from '@/lib/model';

/** Independent Poisson log-linear fit by bisection on the profile score (a eliminated exactly). */
function profileScoreFit(y: number[]): { r: number; se: number } {
  const n = y.length;
  const sumY = y.reduce((s, v) => s + v, 0);
  const tY = y.reduce((s, v, t) => s + t * v, 0);
  // Score for r with a = ln(Σy / Σe^{rt}) plugged in: Σ t·y − Σy · Σ t e^{rt} / Σ e^{rt}, decreasing in r.
  const score = (r: number) => {
    let s0 = 0;
    let s1 = 0;
    for (let t = 0; t < n; t++) {
      s0 += Math.exp(r * t);
      s1 += t * Math.exp(r * t);
    }
    return tY - (sumY * s1) / s0;
  };
  let lo = -5;
  let hi = 5;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (score(mid) > 0) lo = mid;
    else hi = mid;
  }
  const r = (lo + hi) / 2;
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  for (let t = 0; t < n; t++) {
    const e = Math.exp(r * t);
    s0 += e;
    s1 += t * e;
    s2 += t * t * e;
  }
  const mu0 = sumY / s0;
  // Var(r) = 1 / (Σμt² − (Σμt)²/Σμ): Schur complement of the Fisher information.
  const se = 1 / Math.sqrt(mu0 * (s2 - (s1 * s1) / s0));
  return { r, se };
}

describe('growthRate (Poisson log-linear regression)', () => {
  it('recovers r exactly from noise-free exponential counts', () => {
    // [calc] y_t = 12·e^{0.13 t} is exactly on the model; the MLE reproduces it.
    const y = Array.from({ length: 30 }, (_, t) => 12 * Math.exp(0.13 * t));
    const g = growthRate(y, { from: 5, to: 24 });
    expect(g.r).toBeCloseTo(0.13, 10);
    expect(g.intercept).toBeCloseTo(12 * Math.exp(0.13 * 5), 7);
    expect(g.doublingTime).toBeCloseTo(Math.LN2 / 0.13, 8);
    expect(g.deviance).toBeLessThan(1e-9);
  });

  it('agrees with an independent profile-score fit on integer counts, estimate and SE', () => {
    // [calc] second method: bisection on the profile score, SE from the Schur complement
    const y = [2, 1, 4, 3, 6, 5, 9, 8, 14, 12, 19, 23, 22, 35, 31];
    const g = growthRate(y, { from: 0, to: y.length - 1 });
    const ref = profileScoreFit(y);
    expect(g.r).toBeCloseTo(ref.r, 9);
    expect(g.se).toBeCloseTo(ref.se, 9);
    // [pub] 95% Wald interval uses z = 1.959964 (A&S table 26.5)
    expect(g.interval[1] - g.r).toBeCloseTo(1.959964 * ref.se, 6);
  });

  it('Wald 95% interval covers the true r in about 95% of Poisson samples', () => {
    // [cp] frequentist coverage check; 400 seeds → binomial sd ≈ 1.1 percentage points
    const rTrue = 0.08;
    let covered = 0;
    const trials = 400;
    for (let seed = 1; seed <= trials; seed++) {
      const rng = createRng(seed);
      const y = Array.from({ length: 21 }, (_, t) => rng.poisson(5 * Math.exp(rTrue * t)));
      const g = growthRate(y, { from: 0, to: 20 });
      if (g.interval[0] <= rTrue && rTrue <= g.interval[1]) covered++;
    }
    const coverage = covered / trials;
    expect(coverage).toBeGreaterThan(0.92);
    expect(coverage).toBeLessThan(0.98);
  });

  it('falling counts: r < 0, doubling time Infinity, halving time ln2/|r|', () => {
    // [calc] definitions as documented on GrowthResult
    const y = Array.from({ length: 20 }, (_, t) => 400 * Math.exp(-0.1 * t));
    const g = growthRate(y, { from: 0, to: 19 });
    expect(g.r).toBeCloseTo(-0.1, 9);
    expect(g.doublingTime).toBe(Infinity);
    expect(g.halvingTime).toBeCloseTo(Math.LN2 / 0.1, 7);
    expect(g.doublingInterval).toEqual([Infinity, Infinity]);
  });

  it('doubling interval is open above when the r-interval reaches zero', () => {
    const y = [3, 0, 2, 4, 1, 3, 2, 5];
    const g = growthRate(y, { from: 0, to: 7 });
    expect(g.interval[0]).toBeLessThan(0);
    expect(g.doublingInterval[1]).toBe(Infinity);
    expect(g.doublingInterval[0]).toBeCloseTo(Math.LN2 / g.interval[1], 10);
  });

  it('reports over-dispersion and widens the quasi-Poisson interval', () => {
    // [calc] counts alternating ×/÷ 2 around a trend are far more variable than Poisson
    const y = Array.from({ length: 20 }, (_, t) => Math.round(50 * Math.exp(0.05 * t) * (t % 2 ? 2 : 0.5)));
    const g = growthRate(y, { from: 0, to: 19 });
    expect(g.dispersion).toBeGreaterThan(10);
    expect(g.quasiInterval[1] - g.quasiInterval[0]).toBeGreaterThan(3 * (g.interval[1] - g.interval[0]));
  });

  it('refuses windows without a defined estimate', () => {
    expect(() => growthRate([1, 2, 3], { from: 0, to: 5 })).toThrow(RangeError);
    expect(() => growthRate([1, 2, 3], { from: 0, to: 1 })).toThrow(RangeError);
    expect(() => growthRate([0, 0, 0, 7], { from: 0, to: 3 })).toThrow(/fewer than two days/);
    expect(() => growthRate([1, -2, 3], { from: 0, to: 2 })).toThrow(RangeError);
  });
});

describe('R0FromGrowth (Wallinga & Lipsitch 2007, Proc R Soc B 274:599–604)', () => {
  it('SIR: R0 = 1 + r/γ, which is β/γ for r = β − γ', () => {
    // [pub] REFERENCES.md §3
    expect(R0FromGrowth(0.25, { model: 'SIR', gamma: 0.25 })).toBeCloseTo(2, 14);
  });
  it('SEIR: β = 0.5, σ = 0.2, γ = 0.25 → r = 0.092214 and R0 = 2', () => {
    // [calc] REFERENCES.md §3: r = [−(σ+γ) + √((σ−γ)² + 4σβ)]/2
    const beta = 0.5;
    const sigma = 0.2;
    const gamma = 0.25;
    const r = (-(sigma + gamma) + Math.sqrt((sigma - gamma) ** 2 + 4 * sigma * beta)) / 2;
    expect(r).toBeCloseTo(0.092214, 6);
    expect(R0FromGrowth(r, { model: 'SEIR', gamma, sigma })).toBeCloseTo(beta / gamma, 12);
  });
  it('returns NaN outside the range where the relation holds, and needs sigma for SEIR', () => {
    expect(R0FromGrowth(-0.3, { model: 'SIR', gamma: 0.25 })).toBeNaN();
    expect(() => R0FromGrowth(0.1, { model: 'SEIR', gamma: 0.25 })).toThrow(RangeError);
  });
});

describe('growthRate on engine output', () => {
  it('SEIR β = 0.5, σ = 0.2, γ = 0.25: log-slope of early incidence is r = 0.092214', () => {
    // [calc] REFERENCES.md §3 (eigenvalue formula and the log-slope of a run agree)
    const run = simulate({
      model: 'SEIR', population: 1e9, initial: { I: 0, E: 10 }, params: { beta: 0.5, gamma: 0.25, sigma: 0.2 },
      method: 'rk4', step: 0.05, days: 120,
    });
    // skip the first 40 days (transient towards the dominant eigenvector); S/N stays ≈ 1 up to day 100
    const g = growthRate(Array.from(run.incidence), { from: 40, to: 100 });
    expect(g.r).toBeCloseTo(0.092214, 4);
    expect(R0FromGrowth(g.r, { model: 'SEIR', gamma: 0.25, sigma: 0.2 })).toBeCloseTo(2, 2);
  });
});
