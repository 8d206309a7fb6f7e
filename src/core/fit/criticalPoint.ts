/**
 * Redlich–Kister coefficients that put a critical point at a measured (Tc, xc).
 *
 * At a critical point g'' = g''' = 0 (spec: critical point). With two constant terms L0, L1:
 *   g''  = RT/(x y) + L0 f0'' + L1 f1''                = 0
 *   g''' = RT (1/y^2 - 1/x^2) + L0 f0''' + L1 f1'''   = 0,
 * linear in (L0, L1), with f_k from ./rkBasis (f0'' = -2, f0''' = 0, f1'' = -6d, f1''' = 12).
 * Without xc, one term L0 = 2 R Tc puts the point at x = 1/2 (the regular solution). The result is
 * accepted only if the model's own critical-point search finds an upper critical point there: a
 * point with g'' = g''' = 0 inside a wider gap is no critical point of the phase diagram.
 */
import { R, T_SEARCH_MAX, T_SEARCH_MIN } from '../constants';
import { criticalPoints } from '../critical';
import { fail } from '../errors';
import type { RedlichKisterTerm } from '../models/redlichKister';
import { redlichKister } from '../models/redlichKister';
import { second, third } from './rkBasis';

/** Relative agreement required between the requested point and the one the search finds. */
const AGREEMENT = 1e-6;

/** Two terms (L1 = 0 when xc is 1/2 or not given), constant in temperature. */
export function fitCriticalPoint(Tc: number, xc?: number): RedlichKisterTerm[] {
  if (!(Tc >= T_SEARCH_MIN && Tc <= T_SEARCH_MAX)) {
    fail('range', `the critical temperature Tc = ${Tc} K must lie between ${T_SEARCH_MIN} K and ${T_SEARCH_MAX} K, where critical points are searched`);
  }
  const x = xc ?? 0.5;
  if (!(x > 0 && x < 1)) fail('range', `the critical composition xc = ${x} must lie strictly between 0 and 1`);
  const y = 1 - x, RT = R * Tc;
  // [f0'' f1''; f0''' f1'''] [L0; L1] = -[RT/(xy); RT(1/y^2 - 1/x^2)]
  const a11 = second(0, x, y), a12 = second(1, x, y), a21 = third(0, x, y), a22 = third(1, x, y);
  const r1 = -RT / (x * y), r2 = -RT * (1 / (y * y) - 1 / (x * x));
  const det = a11 * a22 - a12 * a21;
  const L0 = (r1 * a22 - a12 * r2) / det;
  const L1 = (a11 * r2 - r1 * a21) / det;
  const terms = [{ a: L0, b: 0, c: 0 }, { a: L1 + 0, b: 0, c: 0 }]; // + 0: no -0 in cells

  const found = criticalPoints(redlichKister(terms));
  const match = found.find((p) => Math.abs(p.T - Tc) <= AGREEMENT * Tc && Math.abs(p.x - x) <= AGREEMENT);
  if (!match || match.kind !== 'upper') {
    const seen = found.length === 0 ? 'none' : found.map((p) => `${p.kind} at ${p.T.toPrecision(6)} K, x = ${p.x.toPrecision(4)}`).join('; ');
    fail('none', `two constant terms can make g'' = g''' = 0 at xc = ${x}, Tc = ${Tc} K, but no gap closes there ` +
      `(the point lies inside a wider gap; critical points of the result: ${seen}): choose xc closer to 1/2 or fit tie-lines instead`);
  }
  return terms;
}
