import { convexBranches, solveSlope, type PhaseMap } from './binodal';
import { fail, MixgapError } from './errors';
import type { BinaryModel, Isotherm } from './model';
import { pointAt } from './model';

/**
 * Chemical potentials relative to the pure components, per mole of molecules, with activities and
 * activity coefficients, at composition x (mole fraction of B; Flory–Huggins: volume fraction of B).
 * All of them are kept as logarithms, so a dilute end keeps full relative precision: a polymer
 * activity of exp(-900) lies below the smallest double, its logarithm does not.
 */
export interface Activities {
  /** Mu_A, Mu_B: chemical potentials per mole of molecules of A and of B (J/mol). */
  muA: number;
  muB: number;
  /** ln a_i = Mu_i / RT. */
  lnA: number;
  lnB: number;
  /** ln gamma_i = ln a_i - ln x_i (Flory–Huggins: ln a_i - ln phi_i). */
  lnGammaA: number;
  lnGammaB: number;
}

/**
 * Activities of `model` at T (kelvin) and x. The model's g is per mole of what it counts: molecules
 * for the mole-fraction models, lattice sites for Flory–Huggins, whose molecules of A and B occupy
 * N_A and N_B sites (`model.sites`; one each when absent). Per mole of those,
 *   mu_A = g - x g',  mu_B = g + (1 - x) g',
 * and per mole of molecules
 *   Mu_A = N_A mu_A,  Mu_B = N_B mu_B,  ln a_i = Mu_i / RT,  gamma_i = a_i / x_i,
 * which for Flory–Huggins are (Flory 1953, ch. XII)
 *   Mu_A/RT = ln(1-phi) + (1 - N_A/N_B) phi + chi N_A phi^2,  and A <-> B, phi <-> 1 - phi.
 */
export function activities(model: BinaryModel, T: number, x: number): Activities {
  const iso = model.at(T);
  const NA = model.sites?.A ?? 1, NB = model.sites?.B ?? 1;
  const y = 1 - x;
  const g = iso.g(x, y), dg = iso.dg(x, y);
  const muA = NA * (g - x * dg), muB = NB * (g + y * dg);
  const lnA = muA / iso.RT, lnB = muB / iso.RT;
  return { muA, muB, lnA, lnB, lnGammaA: lnA - Math.log1p(-x), lnGammaB: lnB - Math.log(x) };
}

/** ln of the smallest positive normal double, 2.2250738585072014e-308 (about -708.4). */
const LN_MIN_NORMAL = Math.log(2.2250738585072014e-308);

/**
 * exp(ln v) for an activity or activity coefficient `what`, when it is a normal double (53
 * significant bits). Below 2.2e-308 a double holds it with fewer digits or as 0: that is no
 * answer, so it fails ('range') with the logarithm and `instead` (where the user finds it). Above
 * the largest double it is Infinity, which the caller reports as an overflow.
 */
export function expOfLog(ln: number, what: string, instead: string): number {
  if (ln < LN_MIN_NORMAL) {
    fail('range', `${what} is exp(${Number(ln.toPrecision(6))}), below 2.2e-308, the smallest number held to full precision: ${instead}`);
  }
  return Math.exp(ln);
}

/**
 * Excess Gibbs energy: g minus ideal mixing RT[x ln x + (1-x) ln(1-x)] in the model's composition
 * variable, per mole of what g counts (Flory–Huggins: per mole of lattice sites).
 */
export function excessGibbs(iso: Isotherm, x: number): number {
  const y = 1 - x;
  return iso.g(x, y) - iso.RT * (x * Math.log(x) + y * Math.log(y));
}

/**
 * Driving force for forming a new phase from a homogeneous x0 (parallel tangent construction):
 *   max over x of [g(x0) + g'(x0)(x - x0) - g(x)] >= 0   (J per mole of the new phase; Flory–Huggins:
 *   per mole of its lattice sites).
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

/**
 * Decomposition gain: g(x0) minus the lower convex envelope at x0 (>= 0; 0 outside every gap), per
 * mole of what g counts (Flory–Huggins: per mole of lattice sites).
 */
export function decompositionGain(iso: Isotherm, map: PhaseMap, x0: number): number {
  const gap = map.gaps.find((g) => g.low.x < x0 && x0 < g.high.x);
  if (!gap) return 0;
  const { x, y } = gap.low;
  return Math.max(0, iso.g(x0, 1 - x0) - iso.g(x, y) - gap.slope * (x0 - x));
}
