/**
 * Nelder–Mead downhill simplex (Nelder & Mead 1965, Computer Journal 7:308–313), with the
 * reflection / expansion / contraction / shrink rules and tie-breaking of Lagarias, Reeds, Wright &
 * Wright (1998, SIAM J Optim 9:112–147). Coefficients are the standard ones (1, 2, ½, ½) or, with
 * `adaptive`, the dimension-dependent ones of Gao & Han (2012, Comput Optim Appl 51:259–277).
 *
 * Works on a preallocated simplex: no allocation per iteration beyond the objective's own.
 */

export interface NelderMeadOptions {
  /** Initial simplex edge along each coordinate (same units as x); default 0.1·|x₀ᵢ| or 0.1 if x₀ᵢ = 0. */
  step?: number | ArrayLike<number>;
  /** Stop when every vertex is within xTol of the best in every coordinate (∞-norm); default 1e-8. */
  xTol?: number;
  /** …and every vertex's value is within fTol of the best; default 1e-10. */
  fTol?: number;
  /** Iteration cap; default 200·dimension. */
  maxIterations?: number;
  /** Cap on objective evaluations; default 400·dimension + 100. */
  maxEvaluations?: number;
  /** Use Gao & Han's adaptive coefficients (helps in higher dimensions). */
  adaptive?: boolean;
}

export interface NelderMeadResult {
  /** The best vertex found. */
  x: Float64Array;
  /** Objective at x. */
  fx: number;
  iterations: number;
  evaluations: number;
  /** True when both tolerances were met before a cap was reached. */
  converged: boolean;
}

/**
 * Minimise f from x0. Non-finite objective values are treated as +Infinity, so a caller can return
 * NaN/Infinity for infeasible points and the simplex moves away from them.
 */
export function nelderMead(
  f: (x: Float64Array) => number,
  x0: ArrayLike<number>,
  options: NelderMeadOptions = {},
): NelderMeadResult {
  const n = x0.length;
  if (n < 1) throw new RangeError('nelderMead: need at least one coordinate');
  const xTol = options.xTol ?? 1e-8;
  const fTol = options.fTol ?? 1e-10;
  const maxIterations = options.maxIterations ?? 200 * n;
  const maxEvaluations = options.maxEvaluations ?? 400 * n + 100;
  const adaptive = options.adaptive ?? false;
  const rho = 1;
  const chi = adaptive ? 1 + 2 / n : 2;
  const psi = adaptive ? 0.75 - 1 / (2 * n) : 0.5;
  const sigma = adaptive ? 1 - 1 / n : 0.5;

  let evaluations = 0;
  const evalf = (x: Float64Array) => {
    evaluations++;
    const v = f(x);
    return Number.isFinite(v) ? v : Infinity;
  };

  // Simplex vertices as rows of one buffer; `order` holds vertex indices sorted by value.
  const verts: Float64Array[] = [];
  const fv = new Float64Array(n + 1);
  for (let i = 0; i <= n; i++) verts.push(new Float64Array(n));
  for (let j = 0; j < n; j++) verts[0]![j] = x0[j]!;
  for (let i = 1; i <= n; i++) {
    const v = verts[i]!;
    for (let j = 0; j < n; j++) v[j] = x0[j]!;
    const s = options.step;
    const base = x0[i - 1]!;
    const h =
      typeof s === 'number' ? s : s !== undefined ? s[i - 1]! : base !== 0 ? 0.1 * Math.abs(base) : 0.1;
    v[i - 1] = base + h;
  }
  for (let i = 0; i <= n; i++) fv[i] = evalf(verts[i]!);
  const order = Array.from({ length: n + 1 }, (_, i) => i);
  const sortOrder = () => order.sort((a, b) => fv[a]! - fv[b]! || a - b);

  const centroid = new Float64Array(n);
  const xr = new Float64Array(n);
  const xe = new Float64Array(n);
  const xc = new Float64Array(n);
  let iterations = 0;
  let converged = false;

  sortOrder();
  while (iterations < maxIterations && evaluations < maxEvaluations) {
    const best = order[0]!;
    const worst = order[n]!;
    const second = order[n - 1]!;
    // Convergence: simplex small in x and flat in f.
    let maxDx = 0;
    let maxDf = 0;
    const xb = verts[best]!;
    for (let k = 1; k <= n; k++) {
      const vi = verts[order[k]!]!;
      for (let j = 0; j < n; j++) maxDx = Math.max(maxDx, Math.abs(vi[j]! - xb[j]!));
      maxDf = Math.max(maxDf, Math.abs(fv[order[k]!]! - fv[best]!));
    }
    if (maxDx <= xTol && maxDf <= fTol) {
      converged = true;
      break;
    }
    iterations++;

    centroid.fill(0);
    for (let k = 0; k < n; k++) {
      const vi = verts[order[k]!]!;
      for (let j = 0; j < n; j++) centroid[j] = centroid[j]! + vi[j]! / n;
    }
    const xw = verts[worst]!;
    for (let j = 0; j < n; j++) xr[j] = centroid[j]! + rho * (centroid[j]! - xw[j]!);
    const fr = evalf(xr);

    if (fr < fv[best]!) {
      for (let j = 0; j < n; j++) xe[j] = centroid[j]! + chi * (xr[j]! - centroid[j]!);
      const fe = evalf(xe);
      if (fe < fr) {
        xw.set(xe);
        fv[worst] = fe;
      } else {
        xw.set(xr);
        fv[worst] = fr;
      }
    } else if (fr < fv[second]!) {
      xw.set(xr);
      fv[worst] = fr;
    } else {
      let shrink = false;
      if (fr < fv[worst]!) {
        // Outside contraction.
        for (let j = 0; j < n; j++) xc[j] = centroid[j]! + psi * (xr[j]! - centroid[j]!);
        const fc = evalf(xc);
        if (fc <= fr) {
          xw.set(xc);
          fv[worst] = fc;
        } else shrink = true;
      } else {
        // Inside contraction.
        for (let j = 0; j < n; j++) xc[j] = centroid[j]! - psi * (centroid[j]! - xw[j]!);
        const fc = evalf(xc);
        if (fc < fv[worst]!) {
          xw.set(xc);
          fv[worst] = fc;
        } else shrink = true;
      }
      if (shrink) {
        for (let k = 1; k <= n; k++) {
          const vi = verts[order[k]!]!;
          for (let j = 0; j < n; j++) vi[j] = xb[j]! + sigma * (vi[j]! - xb[j]!);
          fv[order[k]!] = evalf(vi);
        }
      }
    }
    sortOrder();
  }
  const b = order[0]!;
  return { x: Float64Array.from(verts[b]!), fx: fv[b]!, iterations, evaluations, converged };
}
