/**
 * Solves and inverses of the fits' small dense matrices (p x p, p up to about 10) by Gaussian
 * elimination with partial pivoting (../ternary/linear.ts). mathjs's lusolve and inv cost 0.15 ms
 * to several ms a call through its typed-function dispatch, more than the rest of a fit's
 * linear algebra together.
 */
import { solveInPlace } from '../ternary/linear';

/** z with M z = b, or undefined when M is singular. */
export function solve(M: readonly (readonly number[])[], b: readonly number[]): number[] | undefined {
  const n = b.length;
  const A = new Float64Array(n * n), z = Float64Array.from(b);
  M.forEach((row, i) => row.forEach((v, j) => { A[i * n + j] = v; }));
  return solveInPlace(A, z, n) ? Array.from(z) : undefined;
}

/** M^-1, column by column, or undefined when M is singular. */
export function invert(M: readonly (readonly number[])[]): number[][] | undefined {
  const n = M.length;
  const columns: number[][] = [];
  for (let k = 0; k < n; k++) {
    const c = solve(M, Array.from({ length: n }, (_, i) => (i === k ? 1 : 0)));
    if (!c) return undefined;
    columns.push(c);
  }
  return Array.from({ length: n }, (_, i) => columns.map((c) => c[i]));
}
