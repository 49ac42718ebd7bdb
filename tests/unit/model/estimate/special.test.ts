import { describe, expect, it } from 'vitest';
import {
  chiSquareQuantile,
  gammaP,
  gammaQ,
  gammaQuantile,
  lnGamma,
  normalCdf,
  normalQuantile,
} from '@/lib/model/estimate/special';

describe('lnGamma', () => {
  it('matches factorials and Γ(1/2) = √π', () => {
    // [calc] Γ(n) = (n − 1)!, Γ(½) = √π (standard identities)
    expect(lnGamma(10)).toBeCloseTo(Math.log(362880), 12);
    expect(lnGamma(1)).toBeCloseTo(0, 13);
    expect(lnGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 13);
    // [calc] Γ(x) = Γ(1 + x)/x with Γ(1.001) ≈ 1 − 0.001·γ_Euler: ln Γ(0.001) = 6.907178885383853
    expect(lnGamma(0.001)).toBeCloseTo(6.907178885383853, 9);
    // [pub] ln Γ(100) = ln(99!) = 359.13420536957540 (A&S table 6.3 style value; calc via Σ ln k)
    let s = 0;
    for (let k = 2; k < 100; k++) s += Math.log(k);
    expect(lnGamma(100)).toBeCloseTo(s, 9);
  });
});

describe('regularised incomplete gamma', () => {
  it('reduces to the exponential CDF for shape 1 and to erf for shape 1/2', () => {
    // [calc] P(1, x) = 1 − e^(−x)
    for (const x of [0.01, 0.5, 1, 2, 5, 20]) expect(gammaP(1, x)).toBeCloseTo(1 - Math.exp(-x), 14);
    // [pub] erf(1) = 0.8427007929497149 (Abramowitz & Stegun table 7.1); P(½, x) = erf(√x)
    expect(gammaP(0.5, 1)).toBeCloseTo(0.8427007929497149, 14);
    // [pub] erf(2) = 0.9953222650189527
    expect(gammaP(0.5, 4)).toBeCloseTo(0.9953222650189527, 14);
  });
  it('P + Q = 1 on both sides of the series / continued-fraction switch', () => {
    // [calc] identity
    for (const a of [0.1, 1, 3.5, 50]) {
      for (const x of [0.2 * a, a + 0.99, a + 1.01, 3 * a + 5]) {
        expect(gammaP(a, x) + gammaQ(a, x)).toBeCloseTo(1, 13);
      }
    }
  });
  it('Poisson identity Q(k+1, λ) = P(Poisson(λ) ≤ k)', () => {
    // [calc] standard identity, summed directly
    const lambda = 7.3;
    let cdf = 0;
    let p = Math.exp(-lambda);
    for (let k = 0; k < 15; k++) {
      cdf += p;
      expect(gammaQ(k + 1, lambda)).toBeCloseTo(cdf, 13);
      p *= lambda / (k + 1);
    }
  });
});

describe('chi-square and gamma quantiles', () => {
  // [pub] NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.4 "Critical values of the
  // chi-square distribution" (also Abramowitz & Stegun table 26.8); values printed to 3 decimals.
  const table: [df: number, p: number, value: number][] = [
    [1, 0.95, 3.841],
    [1, 0.99, 6.635],
    [2, 0.95, 5.991],
    [3, 0.95, 7.815],
    [5, 0.95, 11.07],
    [10, 0.975, 20.483],
    [10, 0.025, 3.247],
    [20, 0.05, 10.851],
    [30, 0.99, 50.892],
    [100, 0.95, 124.342],
    [100, 0.05, 77.929],
  ];
  it.each(table)('χ²(%d) quantile at %f is %f', (df, p, value) => {
    expect(Math.abs(chiSquareQuantile(p, df) - value)).toBeLessThan(6e-4);
  });
  it('χ²₁ at 0.05 (small-quantile end of the table)', () => {
    // [pub] NIST e-Handbook 1.3.6.7.4 lower-tail table: 0.004 for df = 1 at 0.05; [calc] the χ²₁
    // quantile at p is z_{(1+p)/2}², and z_{0.525} = 0.0627068 gives 0.00393214
    expect(chiSquareQuantile(0.05, 1)).toBeCloseTo(0.00393214, 8);
  });
  it('matches closed forms: χ²₂ quantile = −2 ln(1 − p); exponential quantile = −ln(1 − p)', () => {
    // [calc] Gamma(1, θ) is exponential
    for (const p of [1e-12, 1e-6, 0.01, 0.3, 0.5, 0.9, 0.999999, 1 - 1e-12]) {
      const exact = -2 * Math.log1p(-p);
      expect(Math.abs(chiSquareQuantile(p, 2) - exact)).toBeLessThan(1e-12 * Math.max(1, exact));
      expect(gammaQuantile(p, 1, 3)).toBeCloseTo(-3 * Math.log1p(-p), 10);
    }
  });
  it('inverts P to round-off over a wide grid of shapes and levels', () => {
    // [calc] round trip P(a, Q⁻¹(p)) = p, relative error in the smaller tail
    for (const a of [0.05, 0.3, 1, 2.5, 12, 300, 1e4]) {
      for (const p of [1e-10, 1e-4, 0.025, 0.5, 0.975, 1 - 1e-4, 1 - 1e-10]) {
        const x = gammaQuantile(p, a);
        const back = p > 0.5 ? gammaQ(a, x) : gammaP(a, x);
        const tail = p > 0.5 ? 1 - p : p;
        expect(Math.abs(back - tail) / tail).toBeLessThan(1e-9);
      }
    }
  });
});

describe('normal quantile and CDF', () => {
  it('matches published critical values', () => {
    // [pub] Abramowitz & Stegun table 26.5 / NIST e-Handbook 1.3.6.7.1
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963985, 8);
    expect(normalQuantile(0.995)).toBeCloseTo(2.575829304, 8);
    expect(normalQuantile(0.999)).toBeCloseTo(3.090232306, 8);
    expect(normalQuantile(0.05)).toBeCloseTo(-1.644853627, 8);
    expect(normalQuantile(0.5)).toBe(0);
  });
  it('Φ(1.96) = 0.9750021 and Φ(−1) = 0.1586553', () => {
    // [pub] A&S table 26.1
    expect(normalCdf(1.96)).toBeCloseTo(0.9750021048517795, 12);
    expect(normalCdf(-1)).toBeCloseTo(0.15865525393145707, 12);
  });
});
