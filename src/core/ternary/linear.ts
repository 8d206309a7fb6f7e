/**
 * Small dense linear systems (n <= 6) for the ternary solvers: Gaussian elimination with partial
 * pivoting, in place, no allocation.
 */

/**
 * Solves A v = b for an n x n matrix A (row-major in `A`, overwritten) and b (overwritten by v).
 * Returns false when A is singular (a zero or subnormal pivot, or a non-finite result).
 */
export function solveInPlace(A: Float64Array, b: Float64Array, n: number): boolean {
  for (let col = 0; col < n; col++) {
    let piv = col, big = Math.abs(A[col * n + col]);
    for (let r = col + 1; r < n; r++) {
      const v = Math.abs(A[r * n + col]);
      if (v > big) { big = v; piv = r; }
    }
    if (!(big > 1e-300)) return false;
    if (piv !== col) {
      for (let c = 0; c < n; c++) {
        const t = A[col * n + c]; A[col * n + c] = A[piv * n + c]; A[piv * n + c] = t;
      }
      const t = b[col]; b[col] = b[piv]; b[piv] = t;
    }
    const d = A[col * n + col];
    for (let r = col + 1; r < n; r++) {
      const f = A[r * n + col] / d;
      if (f === 0) continue;
      for (let c = col; c < n; c++) A[r * n + c] -= f * A[col * n + c];
      b[r] -= f * b[col];
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r];
    for (let c = r + 1; c < n; c++) s -= A[r * n + c] * b[c];
    b[r] = s / A[r * n + r];
    if (!Number.isFinite(b[r])) return false;
  }
  return true;
}
