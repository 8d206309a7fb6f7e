/**
 * Weighted linear least squares for the fits (small matrices: ./smallMatrix.ts, ./symmetricEigen.ts).
 *
 * The rows arrive already weighted (each equation scaled so that its residual reads as a
 * composition error). Columns are equilibrated (scaled to unit length) before the normal matrix
 * N = A^T A is formed; the condition number of the equilibrated A, sqrt(lambda_max/lambda_min)
 * of N, decides whether the data determine the coefficients at all.
 */
import { fail } from '../errors';
import { invert, solve } from './smallMatrix';
import { symmetricEigen } from './symmetricEigen';

/**
 * Above this condition number of the equilibrated design matrix the fit is refused: the normal
 * equations would lose cond^2 * 2.2e-16 of relative accuracy (2e-4 at 1e6), and the data cannot
 * tell the coefficients apart in any useful way.
 */
export const MAX_CONDITION = 1e6;

export interface LeastSquares {
  /** The solution theta minimising |A theta - r|^2. */
  theta: number[];
  /** Covariance of theta from the residual variance, or undefined with no degrees of freedom. */
  covariance?: number[][];
  /** Residual variance s^2 = |A theta - r|^2 / (n - p) (undefined when n = p). */
  variance?: number;
  /** Residuals A theta - r, one per row. */
  residuals: number[];
  /** Condition number of the column-equilibrated A. */
  condition: number;
  /** n - p. */
  dof: number;
}

/**
 * Solves min |A theta - r| for A (n x p, n >= p). `what` names the unknowns in messages
 * ("coefficients"); `advice` says what to change when the data do not determine them.
 */
export function leastSquares(A: number[][], r: number[], what: string, advice: string): LeastSquares {
  const n = A.length, p = A[0]?.length ?? 0;
  if (n < p) fail('input', `${n} equations cannot determine ${p} ${what}: ${advice}`);
  // Equilibrate: column j divided by its length s_j.
  const s = new Array<number>(p).fill(0);
  for (const row of A) for (let j = 0; j < p; j++) s[j] += row[j] * row[j];
  for (let j = 0; j < p; j++) {
    s[j] = Math.sqrt(s[j]);
    if (!(s[j] > 0) || !Number.isFinite(s[j])) fail('input', `the data give no information on one of the ${what} (a column of zeros): ${advice}`);
  }
  const N: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const b = new Array<number>(p).fill(0);
  for (let i = 0; i < n; i++) {
    const row = A[i];
    for (let j = 0; j < p; j++) {
      const aj = row[j] / s[j];
      b[j] += aj * r[i];
      for (let k = 0; k <= j; k++) N[j][k] += aj * (row[k] / s[k]);
    }
  }
  for (let j = 0; j < p; j++) for (let k = 0; k < j; k++) N[k][j] = N[j][k];

  const lambdas = symmetricEigen(N).values;
  const lmin = Math.min(...lambdas), lmax = Math.max(...lambdas);
  const condition = lmin > 0 ? Math.sqrt(lmax / lmin) : Infinity;
  if (!(condition <= MAX_CONDITION)) {
    fail('input', `the fit is ill-conditioned (condition number ${condition === Infinity ? 'infinite' : condition.toExponential(1)}): the data cannot tell the ${what} apart; ${advice}`);
  }
  const z = solve(N, b);
  if (!z) return fail('input', `the data cannot tell the ${what} apart (a singular normal matrix); ${advice}`);
  const theta = z.map((v, j) => v / s[j]);

  const residuals = A.map((row, i) => row.reduce((sum, a, j) => sum + a * theta[j], 0) - r[i]);
  const dof = n - p;
  if (dof === 0) return { theta, residuals, condition, dof };
  const variance = residuals.reduce((sum, e) => sum + e * e, 0) / dof;
  const Ninv = invert(N);
  if (!Ninv) return fail('input', `the data cannot tell the ${what} apart (a singular normal matrix); ${advice}`);
  const covariance = Ninv.map((row, j) => row.map((v, k) => (variance * v) / (s[j] * s[k])));
  return { theta, covariance, variance, residuals, condition, dof };
}
