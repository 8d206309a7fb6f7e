/**
 * Closed forms of the regular solution (spec, "Closed forms"), solved here in 36-digit decimals so
 * that they stay exact where the double-precision form is ill-conditioned (near Tc) or out of
 * range of a naive evaluation (very dilute boundaries).
 */
import type { BigNumber } from 'mathjs';
import { big, exact } from './symbolic';
import { R_SPEC } from './spec';

/**
 * Symmetric regular-solution binodal at T: ln[x/(1-x)] = Omega(2x-1)/(RT). With u = ln[x/(1-x)]
 * and 2x - 1 = tanh(u/2), it reads u = a tanh(u/2), a = Omega/(RT); the A-rich root lies between
 * u = -a - 1 and the spinodal u_s = -2 acosh(sqrt(a/2)) (from x y = 1/(2a), x y = 1/(4 cosh^2(u/2))).
 * Bisection in decimals; returns u and x = 1/(1 + e^-u) rounded to doubles (x may be far below 1e-300
 * in the decimal arithmetic; then it rounds to 0).
 */
export function regularBinodal(omega: number, T: number): { u: number; x: number } {
  const a = big.divide(exact(omega), big.multiply(exact(R_SPEC), exact(T))) as BigNumber;
  const two = big.bignumber(2) as BigNumber, one = big.bignumber(1) as BigNumber;
  const f = (u: BigNumber) => big.subtract(u, big.multiply(a, big.tanh(big.divide(u, two) as BigNumber))) as BigNumber;
  let lo = big.subtract(big.unaryMinus(a), one) as BigNumber;
  let hi = big.multiply(-2, big.acosh(big.sqrt(big.divide(a, two) as BigNumber) as BigNumber)) as BigNumber;
  if (!(big.number(f(lo)) < 0 && big.number(f(hi)) > 0)) throw new Error(`no binodal bracket at a = ${big.number(a)}`);
  for (let i = 0; i < 160; i++) {
    const mid = big.divide(big.add(lo, hi), two) as BigNumber;
    if (big.isNegative(f(mid))) lo = mid; else hi = mid;
  }
  const u = big.divide(big.add(lo, hi), two) as BigNumber;
  const x = big.divide(one, big.add(one, big.exp(big.unaryMinus(u)))) as BigNumber;
  return { u: big.number(u) as number, x: big.number(x) as number };
}

/** Regular-solution spinodal: x(1-x) = RT/(2 Omega) = c, the A-rich root x = 2c/(1 + sqrt(1 - 4c)). */
export function regularSpinodal(omega: number, T: number): number {
  const c = (R_SPEC * T) / (2 * omega);
  return (2 * c) / (1 + Math.sqrt(1 - 4 * c));
}
