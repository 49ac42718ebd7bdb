/**
 * Seeded pseudo-random numbers for reproducible ensembles and synthetic data: SplitMix32-seeded
 * xoshiro128** (Blackman & Vigna 2018), standard normal by Box–Muller, Poisson by inversion for small
 * means and by Hörmann's PTRS transformed rejection (1993, Insurance Math Econ 12:39–45) for large.
 */
import { lnGamma } from './special';

export interface Rng {
  /** Uniform on [0, 1). */
  next(): number;
  /** Standard normal. */
  normal(): number;
  /** Poisson with mean lambda ≥ 0. */
  poisson(lambda: number): number;
}

export function createRng(seed: number): Rng {
  // SplitMix32 to spread the seed over the four state words (never all zero).
  let s = seed >>> 0;
  const splitmix = () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  let a = splitmix();
  let b = splitmix();
  let c = splitmix();
  let d = splitmix();
  if ((a | b | c | d) === 0) a = 1;
  const u32 = () => {
    const result = Math.imul(rotl(Math.imul(b, 5) >>> 0, 7), 9) >>> 0;
    const t = (b << 9) >>> 0;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    return result;
  };
  // 53-bit uniform from two 32-bit draws.
  const next = () => ((u32() >>> 5) * 67108864 + (u32() >>> 6)) / 9007199254740992;
  let spare: number | null = null;
  const normal = () => {
    if (spare !== null) {
      const v = spare;
      spare = null;
      return v;
    }
    let u = 0;
    while (u === 0) u = next();
    const v = next();
    const rad = Math.sqrt(-2 * Math.log(u));
    spare = rad * Math.sin(2 * Math.PI * v);
    return rad * Math.cos(2 * Math.PI * v);
  };
  const poisson = (lambda: number) => {
    if (!(lambda >= 0)) return Number.NaN;
    if (lambda === 0) return 0;
    if (lambda < 30) {
      // Inversion by sequential search.
      let k = 0;
      let p = Math.exp(-lambda);
      let cdf = p;
      const u = next();
      while (u > cdf && k < 1000) {
        k++;
        p *= lambda / k;
        cdf += p;
      }
      return k;
    }
    // PTRS.
    const slam = Math.sqrt(lambda);
    const loglam = Math.log(lambda);
    const bb = 0.931 + 2.53 * slam;
    const aa = -0.059 + 0.02483 * bb;
    const invalpha = 1.1239 + 1.1328 / (bb - 3.4);
    const vr = 0.9277 - 3.6224 / (bb - 2);
    for (;;) {
      const U = next() - 0.5;
      const V = next();
      const us = 0.5 - Math.abs(U);
      const k = Math.floor(((2 * aa) / us + bb) * U + lambda + 0.43);
      if (us >= 0.07 && V <= vr) return k;
      if (k < 0 || (us < 0.013 && V > us)) continue;
      if (Math.log(V) + Math.log(invalpha) - Math.log(aa / (us * us) + bb) <= -lambda + k * loglam - lnGamma(k + 1)) {
        return k;
      }
    }
  };
  return { next, normal, poisson };
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/** Empirical quantile with linear interpolation between order statistics (type 7), on sorted data. */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}
