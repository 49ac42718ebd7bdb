import { describe, expect, it } from 'vitest';
import { discretiseSerialInterval, estimateRt } from '@/lib/model/estimate/rt';
import { gammaCdf, gammaQuantile, lnGamma } from '@/lib/model/estimate/special';
import { createRng } from '@/lib/model/estimate/random';

/** Triangle-kernel weight by composite Simpson integration of the gamma density (independent of G0/G1). */
function simpsonWeight(k: number, shape: number, scale: number, shift: number): number {
  const dens = (x: number) => {
    const y = x - shift;
    if (y <= 0) return 0;
    return Math.exp((shape - 1) * Math.log(y) - y / scale - lnGamma(shape) - shape * Math.log(scale));
  };
  const m = 4000;
  const a = k - 1;
  const h = 2 / m;
  let s = 0;
  for (let i = 0; i <= m; i++) {
    const x = a + i * h;
    const f = Math.max(0, 1 - Math.abs(x - k)) * dens(x);
    s += f * (i === 0 || i === m ? 1 : i % 2 ? 4 : 2);
  }
  return (s * h) / 3;
}

describe('discretised serial interval', () => {
  it('shifted (Cori et al. 2013 web appendix): w0 = 0, sums to 1, keeps the mean', () => {
    // [pub] property of the linear-interpolation discretisation (Cori et al. 2013, web appendix) [mem]
    const w = discretiseSerialInterval({ siMean: 4.8, siSd: 2.3 });
    expect(w[0]).toBe(0);
    let s = 0;
    let m = 0;
    w.forEach((v, k) => {
      s += v;
      m += k * v;
    });
    expect(s).toBeCloseTo(1, 12);
    expect(m).toBeCloseTo(4.8, 8);
  });
  it('weights match numerical integration of the triangle kernel against the gamma density', () => {
    // [calc] Simpson's rule, 4000 panels
    const siMean = 6;
    const siSd = 3;
    const shape = ((siMean - 1) / siSd) ** 2;
    const scale = siSd ** 2 / (siMean - 1);
    const w = discretiseSerialInterval({ siMean, siSd });
    for (const k of [1, 2, 3, 6, 12]) expect(w[k]).toBeCloseTo(simpsonWeight(k, shape, scale, 1), 8);
  });
  it('refuses a mean of 1 day or less for the shifted form', () => {
    expect(() => discretiseSerialInterval({ siMean: 1, siSd: 1 })).toThrow(RangeError);
  });
});

describe('estimateRt (Cori et al. 2013, Am J Epidemiol 178:1505–1512)', () => {
  it('constant incidence gives Rt ≈ 1', () => {
    // [pub] renewal equation: with I constant, Λ_t = I·Σw = I once t exceeds the SI support
    const inc = new Array(120).fill(200);
    const est = estimateRt(inc, { siMean: 5, siSd: 2.5 });
    const late = est.filter((e) => e.day >= 60);
    for (const e of late) {
      // posterior mean (1 + 1400)/(0.2 + 1400) differs from 1 by < 1e-3 [calc]
      expect(Math.abs(e.mean - 1)).toBeLessThan(1e-3);
      expect(e.lo).toBeLessThan(1);
      expect(e.hi).toBeGreaterThan(1);
    }
  });

  it('posterior is Gamma(a + ΣI, 1/(1/b + ΣΛ)) — interval from its quantiles', () => {
    // [pub] Cori et al. 2013 eq. for the posterior; [calc] Λ recomputed by hand
    const inc = [5, 3, 8, 6, 10, 12, 9, 15, 14, 20, 18, 25];
    const w = discretiseSerialInterval({ siMean: 3, siSd: 1.5 });
    const est = estimateRt(inc, { siMean: 3, siSd: 1.5, window: 4, priorShape: 2, priorScale: 3 });
    const t = 11;
    let sumI = 0;
    let sumL = 0;
    for (let k = t - 3; k <= t; k++) {
      sumI += inc[k]!;
      for (let s = 1; s <= k && s < w.length; s++) sumL += inc[k - s]! * w[s]!;
    }
    const e = est.find((x) => x.day === t)!;
    const shape = 2 + sumI;
    const scale = 1 / (1 / 3 + sumL);
    expect(e.mean).toBeCloseTo(shape * scale, 12);
    expect(e.lo).toBeCloseTo(gammaQuantile(0.025, shape, scale), 12);
    expect(e.hi).toBeCloseTo(gammaQuantile(0.975, shape, scale), 12);
    expect(est[0]!.day).toBe(4);
  });

  // Exponential growth at rate r: the estimate tends to 1/Σ w_k e^{−rk} (discrete Euler–Lotka) [calc].
  // Wallinga & Lipsitch (2007) give R = 1/M(−r) for the continuous generation interval:
  // Gamma(a, b) → (1 + rb)^a [pub]; the shifted 1 + Gamma(a, b) → e^r (1 + rb)^a [calc from the same].
  // The triangle kernel replaces e^{−rx} by its piecewise-linear interpolant on whole days, whose
  // relative error is at most r²/8 [calc: max over θ of ((1−θ) + θe^{−r})e^{rθ} − 1]; the unshifted
  // form also drops w₀, changing Σw e^{−rk} by at most 2·w₀ relative.
  for (const r of [0.05, 0.1, -0.04]) {
    it(`exponential growth r = ${r}: Rt matches (1 + r·b)^a within the discretisation error`, () => {
      const siMean = 5;
      const siSd = 2.5;
      const inc = Array.from({ length: 240 }, (_, t) => 1e4 * Math.exp(r * (t - 120)));
      for (const discretisation of ['shifted', 'unshifted'] as const) {
        const shift = discretisation === 'shifted' ? 1 : 0;
        const a = ((siMean - shift) / siSd) ** 2;
        const b = siSd ** 2 / (siMean - shift);
        const continuous = Math.exp(r * shift) * (1 + r * b) ** a;
        const w = discretiseSerialInterval({ siMean, siSd, discretisation });
        let W = 0;
        w.forEach((v, k) => (W += v * Math.exp(-r * k)));
        const est = estimateRt(inc, { siMean, siSd, discretisation }).find((e) => e.day === 120)!;
        // prior weight: a0/ΣI and 1/(b0·ΣΛ) are below 1e-4 here [calc]
        expect(Math.abs(est.mean * W - 1)).toBeLessThan(1e-4);
        const w0 = shift ? 0 : gammaCdf(1, a, b) - a * b * gammaCdf(1, a + 1, b);
        const tol = (r * r) / 8 + 2 * w0 + 1e-4;
        expect(Math.abs(est.mean / continuous - 1)).toBeLessThan(tol);
      }
    });
  }

  it('credible intervals cover a known piecewise-constant R on simulated renewal data', () => {
    // [cp] simulation check: I_t ~ Poisson(R_t Λ_t), R = 1.4 then 0.8 from day 70
    const w = discretiseSerialInterval({ siMean: 5, siSd: 2.5 });
    const trueR = (t: number) => (t < 70 ? 1.4 : 0.8);
    let covered = 0;
    let total = 0;
    for (let seed = 1; seed <= 20; seed++) {
      const rng = createRng(seed);
      const inc: number[] = [20];
      for (let t = 1; t < 140; t++) {
        let L = 0;
        for (let s = 1; s <= t && s < w.length; s++) L += inc[t - s]! * w[s]!;
        inc.push(rng.poisson(trueR(t) * L));
      }
      for (const e of estimateRt(inc, { siMean: 5, siSd: 2.5 })) {
        // skip windows that straddle the change and the first month
        if (e.day < 30 || (e.day >= 70 && e.day < 77)) continue;
        total++;
        if (e.lo <= trueR(e.day) && trueR(e.day) <= e.hi) covered++;
      }
    }
    // overlapping windows make days dependent; expect broad agreement with 95%
    expect(covered / total).toBeGreaterThan(0.85);
  });
});
