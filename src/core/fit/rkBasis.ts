/**
 * One Redlich–Kister term with unit coefficient, f_k(x) = x y d^k (d = y - x = 1 - 2x), and what the
 * fits need of it. The excess Gibbs energy is sum_k L_k f_k, so every quantity below multiplies L_k
 * in the model and the fitting equations are linear in the coefficients.
 *
 * Partial excess quantities per unit L_k (mu^ex_A = g^ex - x g^ex', mu^ex_B = g^ex + y g^ex'):
 *   pA_k = x^2 [d^k + 2k y d^(k-1)]        pB_k = y^2 [d^k - 2k x d^(k-1)]
 * Derivatives (dd/dx = -2, d(xy)/dx = d):
 *   f_k''  = -2(2k+1) d^k + 4k(k-1) x y d^(k-2)
 *   f_k''' = 12 k^2 d^(k-1) - 8k(k-1)(k-2) x y d^(k-3)
 */

/** d^n, with d^n = 0 for n < 0 (those terms carry a factor k, k-1 or k-2 that is zero). */
const pow = (d: number, n: number) => (n < 0 ? 0 : n === 0 ? 1 : Math.pow(d, n));

/** Partial excess Gibbs energy of A per unit L_k, at x (y = 1 - x). */
export function partialA(k: number, x: number, y: number): number {
  const d = y - x;
  return x * x * (pow(d, k) + 2 * k * y * pow(d, k - 1));
}

/** Partial excess Gibbs energy of B per unit L_k, at x (y = 1 - x). */
export function partialB(k: number, x: number, y: number): number {
  const d = y - x;
  return y * y * (pow(d, k) - 2 * k * x * pow(d, k - 1));
}

/** d2 f_k / dx2. */
export function second(k: number, x: number, y: number): number {
  const d = y - x;
  return -2 * (2 * k + 1) * pow(d, k) + 4 * k * (k - 1) * x * y * pow(d, k - 2);
}

/** d3 f_k / dx3. */
export function third(k: number, x: number, y: number): number {
  const d = y - x;
  return 12 * k * k * pow(d, k - 1) - 8 * k * (k - 1) * (k - 2) * x * y * pow(d, k - 3);
}
