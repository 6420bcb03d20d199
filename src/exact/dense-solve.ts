/**
 * Solves A x = b in place by Gaussian elimination with partial pivoting (Golub & Van Loan,
 * *Matrix Computations*, 4th ed., Alg. 3.4.1; from memory). `a` is n×n row-major and is
 * overwritten; `b` becomes the solution. Exact evaluation needs no library for this, and a
 * plain loop over one typed array is as fast as anything in JavaScript for n up to a few
 * thousand. Zero multipliers are skipped, which pays off on the sparse systems MDPs give.
 */
export function solveDenseInPlace(a: Float64Array, b: Float64Array, n: number): Float64Array {
  for (let k = 0; k < n; k++) {
    let pivotRow = k;
    let pivotSize = Math.abs(a[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const size = Math.abs(a[i * n + k]);
      if (size > pivotSize) {
        pivotSize = size;
        pivotRow = i;
      }
    }
    if (!(pivotSize > 0)) throw new Error(`singular system at column ${k} of ${n}`);
    if (pivotRow !== k) {
      const rk = k * n;
      const rp = pivotRow * n;
      for (let j = k; j < n; j++) {
        const t = a[rk + j];
        a[rk + j] = a[rp + j];
        a[rp + j] = t;
      }
      const t = b[k];
      b[k] = b[pivotRow];
      b[pivotRow] = t;
    }
    const rk = k * n;
    const pivot = a[rk + k];
    for (let i = k + 1; i < n; i++) {
      const ri = i * n;
      const factor = a[ri + k] / pivot;
      if (factor === 0) continue;
      a[ri + k] = 0;
      for (let j = k + 1; j < n; j++) a[ri + j] -= factor * a[rk + j];
      b[i] -= factor * b[k];
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    const ri = i * n;
    let sum = b[i];
    for (let j = i + 1; j < n; j++) sum -= a[ri + j] * b[j];
    b[i] = sum / a[ri + i];
  }
  return b;
}
