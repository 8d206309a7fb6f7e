import { convexBranches, solveSlope, type PhaseMap } from './binodal';
import { MixgapError } from './errors';
import type { Isotherm } from './model';
import { pointAt } from './model';

/** Chemical potentials relative to the pure components, activities and activity coefficients at x. */
export interface Activities {
  /** mu_A = g - x g', mu_B = g + (1 - x) g' (J/mol). */
  muA: number;
  muB: number;
  /** ln a_i = mu_i / RT. */
  lnA: number;
  lnB: number;
  /** ln gamma_i = ln a_i - ln x_i. */
  lnGammaA: number;
  lnGammaB: number;
}

export function activities(iso: Isotherm, x: number): Activities {
  const y = 1 - x;
  const g = iso.g(x, y), dg = iso.dg(x, y);
  const muA = g - x * dg, muB = g + y * dg;
  const lnA = muA / iso.RT, lnB = muB / iso.RT;
  return { muA, muB, lnA, lnB, lnGammaA: lnA - Math.log1p(-x), lnGammaB: lnB - Math.log(x) };
}

/** Excess Gibbs energy: g minus ideal mixing RT[x ln x + (1-x) ln(1-x)] in the model's composition variable. */
export function excessGibbs(iso: Isotherm, x: number): number {
  const y = 1 - x;
  return iso.g(x, y) - iso.RT * (x * Math.log(x) + y * Math.log(y));
}

/**
 * Driving force for forming a new phase from a homogeneous x0 (parallel tangent construction):
 *   max over x of [g(x0) + g'(x0)(x - x0) - g(x)] >= 0   (J per mole of the new phase).
 * The maximum sits where g'(x) = g'(x0) on a convex stretch of g; there is at most one such point
 * per stretch, each found by the same safeguarded solve as the common tangent.
 */
export function drivingForce(iso: Isotherm, map: PhaseMap, x0: number): number {
  const y0 = 1 - x0;
  const m0 = iso.dg(x0, y0);
  const g0 = iso.g(x0, y0);
  let best = 0;
  if (map.spinodal.length === 0) return 0; // g convex everywhere: the tangent at x0 lies below g
  const branches = convexBranches(iso, map.spinodal);
  if (branches.length < 2) return 0; // only a critical point met exactly: still convex
  for (const br of branches) {
    if (!(m0 > br.slopeLow && m0 < br.slopeHigh)) continue;
    let height: number;
    try {
      const p = pointAt(solveSlope(iso, br, m0));
      height = g0 - iso.g(p.x, p.y) - m0 * (x0 - p.x);
    } catch (e) {
      // The touching point lies closer than 1e-300 to a pure component: there g and x are 0 (or
      // g = 0, x = 1) to every digit, and the height is that of the tangent at the end itself,
      // mu_A(x0) = g0 - x0 m0 (or mu_B(x0) = g0 + (1 - x0) m0).
      if (!(e instanceof MixgapError && e.reason === 'range')) throw e;
      height = br.a === -Infinity ? g0 - x0 * m0 : g0 + (1 - x0) * m0;
    }
    best = Math.max(best, height);
  }
  // x0's own stretch gives 0 up to rounding of g (about 1e-16 of its terms): below 1e-12 RT a
  // "driving force" is that rounding, not a new phase.
  return best > 1e-12 * iso.RT ? best : 0;
}

/** Decomposition gain: g(x0) minus the lower convex envelope at x0 (>= 0; 0 outside every gap). */
export function decompositionGain(iso: Isotherm, map: PhaseMap, x0: number): number {
  const gap = map.gaps.find((g) => g.low.x < x0 && x0 < g.high.x);
  if (!gap) return 0;
  const { x, y } = gap.low;
  return Math.max(0, iso.g(x0, 1 - x0) - iso.g(x, y) - gap.slope * (x0 - x));
}
