/**
 * Eigenvalues and eigenvectors of a small real symmetric matrix (the normal matrices of the fits,
 * p <= about 10) by the cyclic Jacobi method (Golub & Van Loan, Matrix Computations, 4th ed.
 * (2013), sec. 8.5, Algorithm 8.5.3 with the rotation of Algorithm 8.5.1): plane rotations zero
 * the off-diagonal entries one by one, sweep after sweep, until their sum of squares is below
 * 1e-32 of the matrix's (quadratic convergence; 5 to 10 sweeps). Jacobi gives even the small
 * eigenvalues of a well-scaled positive definite matrix to high relative accuracy (Demmel &
 * Veselić, SIAM J. Matrix Anal. Appl. 13 (1992) 1204), which the condition numbers need.
 *
 * Written here rather than taken from mathjs: its `eigs` tests symmetry and realness entry by
 * entry through BigNumber conversions and typed-function dispatch, about 1 ms for a 6 x 6 matrix,
 * which made it the largest single cost of a fit's linear start (checked against it in
 * test/core/fit/symmetricEigen.test.ts).
 */
export interface SymmetricEigen {
  /** Eigenvalues, in no particular order. */
  values: number[];
  /** vectors[k]: the unit eigenvector of values[k]. */
  vectors: number[][];
}

export function symmetricEigen(M: readonly (readonly number[])[]): SymmetricEigen {
  const n = M.length;
  const a = M.map((row) => [...row]);
  const v: number[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
  let total = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) total += a[i][j] * a[i][j];
  for (let sweep = 0; sweep < 60; sweep++) {
    let off = 0;
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) off += a[i][j] * a[i][j];
    if (!(off > 1e-32 * total)) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p][q];
        if (apq === 0) continue;
        const tau = (a[q][q] - a[p][p]) / (2 * apq);
        const t = Number.isFinite(tau * tau) ? Math.sign(tau || 1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau)) : 1 / (2 * tau);
        const c = 1 / Math.sqrt(1 + t * t), s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k][p], akq = a[k][q];
          a[k][p] = c * akp - s * akq;
          a[k][q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p][k], aqk = a[q][k];
          a[p][k] = c * apk - s * aqk;
          a[q][k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k][p], vkq = v[k][q];
          v[k][p] = c * vkp - s * vkq;
          v[k][q] = s * vkp + c * vkq;
        }
      }
    }
  }
  return { values: a.map((row, i) => row[i]), vectors: Array.from({ length: n }, (_, k) => v.map((row) => row[k])) };
}
