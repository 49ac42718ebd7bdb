/**
 * Special functions the estimators need: log-gamma, the regularised incomplete gamma function,
 * gamma / chi-square / normal quantiles. Written here rather than taken from a package so that the
 * accuracy is known and tested (tests/unit/model/estimate/special.test.ts).
 */

const LANCZOS_G = 7;
// Lanczos coefficients for g = 7, n = 9 (Numerical Recipes 3rd ed. / Godfrey); ~1e-15 relative.
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
  -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
  1.5056327351493116e-7,
];

/** ln Γ(x) for x > 0 (reflection for x < 0.5 keeps small arguments accurate). */
export function lnGamma(x: number): number {
  if (!(x > 0)) return Number.NaN;
  if (x < 0.5) {
    // Γ(x)Γ(1−x) = π / sin(πx)
    return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  }
  const z = x - 1;
  let a = LANCZOS[0]!;
  const t = z + LANCZOS_G + 0.5;
  for (let i = 1; i < LANCZOS.length; i++) a += LANCZOS[i]! / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

const EPS = 1e-16;
const TINY = 1e-300;
const MAX_ITER = 10_000;

/** Series for P(a, x), good for x < a + 1 (Abramowitz & Stegun 6.5.29). */
function gammaPSeries(a: number, x: number): number {
  let sum = 1 / a;
  let term = sum;
  let ap = a;
  for (let n = 0; n < MAX_ITER; n++) {
    ap += 1;
    term *= x / ap;
    sum += term;
    if (Math.abs(term) < Math.abs(sum) * EPS) break;
  }
  return sum * Math.exp(-x + a * Math.log(x) - lnGamma(a));
}

/** Continued fraction for Q(a, x), good for x ≥ a + 1 (modified Lentz; A&S 6.5.31). */
function gammaQContinuedFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_ITER; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) break;
  }
  return Math.exp(-x + a * Math.log(x) - lnGamma(a)) * h;
}

/** Regularised lower incomplete gamma P(a, x) = γ(a, x)/Γ(a); the gamma CDF at x with unit scale. */
export function gammaP(a: number, x: number): number {
  if (!(a > 0) || Number.isNaN(x)) return Number.NaN;
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return x < a + 1 ? gammaPSeries(a, x) : 1 - gammaQContinuedFraction(a, x);
}

/** Regularised upper incomplete gamma Q(a, x) = 1 − P(a, x), computed directly in the upper tail. */
export function gammaQ(a: number, x: number): number {
  if (!(a > 0) || Number.isNaN(x)) return Number.NaN;
  if (x <= 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - gammaPSeries(a, x) : gammaQContinuedFraction(a, x);
}

/** CDF of Gamma(shape, scale) at x. */
export function gammaCdf(x: number, shape: number, scale: number): number {
  return gammaP(shape, x / scale);
}

/**
 * Quantile of Gamma(shape, scale): the x with P(shape, x/scale) = p.
 * Newton's method on u = ln x for h(u) = ln F(eᵘ) − ln(target), where F is P for p ≤ ½ and the upper
 * tail Q (target 1 − p) for p > ½, so both tails keep their relative accuracy and tiny quantiles of
 * small shapes (P ≈ xᵃ/Γ(a+1), linear in u) converge in a few steps. Every step is kept inside a
 * bracket that shrinks as h changes sign; bisection in u takes over whenever Newton would leave it.
 */
export function gammaQuantile(p: number, shape: number, scale = 1): number {
  if (!(shape > 0) || !(scale > 0) || !(p >= 0 && p <= 1)) return Number.NaN;
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  const a = shape;
  const upper = p > 0.5;
  const lnTarget = Math.log(upper ? 1 - p : p);
  const lga = lnGamma(a);

  // Start: Wilson–Hilferty (χ²_ν quantile ≈ ν(1 − 2/(9ν) + z√(2/(9ν)))³, ν = 2a, x = χ²/2), or the
  // small-x expansion P ≈ xᵃ/Γ(a+1) when that is smaller or Wilson–Hilferty fails.
  const z = normalQuantileRough(p);
  const nu = 2 * a;
  const wh = 1 - 2 / (9 * nu) + z * Math.sqrt(2 / (9 * nu));
  const uSmall = (Math.log(p) + lnGamma(a + 1)) / a;
  let u = wh > 0 ? Math.log((nu * wh * wh * wh) / 2) : uSmall;
  if (!upper && uSmall < u) u = uSmall;
  if (!Number.isFinite(u)) u = Math.log(a);

  // h increases with u in both branches (sign flipped for the upper tail).
  const h = (uu: number): [value: number, slope: number] => {
    const x = Math.exp(uu);
    const lnDensX = a * uu - x - lga; // ln(x · density(x))
    if (upper) {
      const q = gammaQ(a, x);
      return [lnTarget - Math.log(q), Math.exp(lnDensX - Math.log(q))];
    }
    const pp = gammaP(a, x);
    return [Math.log(pp) - lnTarget, Math.exp(lnDensX - Math.log(pp))];
  };

  let lo = -Infinity;
  let hi = Infinity;
  for (let iter = 0; iter < 300; iter++) {
    const [hv, slope] = h(u);
    if (hv === 0) break;
    if (hv > 0 || Number.isNaN(hv)) hi = Math.min(hi, u);
    else lo = Math.max(lo, u);
    let next = u - hv / slope;
    if (!(next > lo && next < hi) || !Number.isFinite(next)) {
      if (hi === Infinity) next = u + Math.max(1, Math.abs(u));
      else if (lo === -Infinity) next = u - Math.max(1, Math.abs(u));
      else next = (lo + hi) / 2;
    }
    const done = Math.abs(next - u) <= 1e-15 * Math.max(1, Math.abs(u)) || hi - lo <= 1e-15 * Math.max(1, Math.abs(u));
    u = next;
    if (done) break;
  }
  return Math.exp(u) * scale;
}

/** Quantile of the chi-square distribution with df degrees of freedom (= Gamma(df/2, 2)). */
export function chiSquareQuantile(p: number, df: number): number {
  return gammaQuantile(p, df / 2, 2);
}

/**
 * Standard normal quantile from the chi-square one: for p > 1/2, z = √(χ²₁ quantile at 2p − 1).
 * Accurate to the same level as gammaQuantile; slower than a rational approximation, which only
 * matters in loops, where callers cache it.
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return Number.NaN;
  if (p === 0.5) return 0;
  if (p > 0.5) return Math.sqrt(chiSquareQuantile(2 * p - 1, 1));
  return -Math.sqrt(chiSquareQuantile(1 - 2 * p, 1));
}

/** Standard normal CDF via the incomplete gamma function: Φ(z) = ½(1 + sign(z)·P(½, z²/2)). */
export function normalCdf(z: number): number {
  if (Number.isNaN(z)) return Number.NaN;
  const half = 0.5 * gammaP(0.5, (z * z) / 2);
  return z >= 0 ? 0.5 + half : 0.5 - half;
}

/** Starting value only: a crude logistic-style approximation of the normal quantile (|error| < 0.01). */
function normalQuantileRough(p: number): number {
  // Shore (1982): z ≈ −5.5556[1 − ((1 − p)/p)^0.1186] for p ≥ 1/2, mirrored below.
  if (p >= 0.5) return -5.5556 * (1 - Math.pow((1 - p) / p, 0.1186));
  return 5.5556 * (1 - Math.pow(p / (1 - p), 0.1186));
}
