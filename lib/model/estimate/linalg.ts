/** Small dense linear algebra for k ≤ 4 parameters: row-major square matrices as Float64Array. */

/** Cholesky factor L (lower, row-major) of a symmetric matrix, or null if it is not positive definite. */
export function cholesky(a: Float64Array, k: number): Float64Array | null {
  const L = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * k + j]!;
      for (let m = 0; m < j; m++) s -= L[i * k + m]! * L[j * k + m]!;
      if (i === j) {
        if (!(s > 0)) return null;
        L[i * k + i] = Math.sqrt(s);
      } else {
        L[i * k + j] = s / L[j * k + j]!;
      }
    }
  }
  return L;
}

/** Inverse of a symmetric positive-definite matrix from its Cholesky factor. */
export function choleskyInverse(L: Float64Array, k: number): Float64Array {
  // Solve L Lᵀ X = I column by column.
  const inv = new Float64Array(k * k);
  const col = new Float64Array(k);
  for (let c = 0; c < k; c++) {
    for (let i = 0; i < k; i++) {
      let s = i === c ? 1 : 0;
      for (let m = 0; m < i; m++) s -= L[i * k + m]! * col[m]!;
      col[i] = s / L[i * k + i]!;
    }
    for (let i = k - 1; i >= 0; i--) {
      let s = col[i]!;
      for (let m = i + 1; m < k; m++) s -= L[m * k + i]! * col[m]!;
      col[i] = s / L[i * k + i]!;
    }
    for (let i = 0; i < k; i++) inv[i * k + c] = col[i]!;
  }
  return inv;
}

/**
 * log density of N(mean, LLᵀ) at x, with L the Cholesky factor; `work` is scratch of length k.
 */
export function logNormalDensity(x: ArrayLike<number>, mean: ArrayLike<number>, L: Float64Array, k: number, work: Float64Array): number {
  let logDet = 0;
  let q = 0;
  for (let i = 0; i < k; i++) {
    let s = x[i]! - mean[i]!;
    for (let m = 0; m < i; m++) s -= L[i * k + m]! * work[m]!;
    const v = s / L[i * k + i]!;
    work[i] = v;
    q += v * v;
    logDet += Math.log(L[i * k + i]!);
  }
  return -0.5 * q - logDet - 0.5 * k * Math.log(2 * Math.PI);
}
