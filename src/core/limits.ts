/**
 * Named limits and tolerances of the solvers, each with its reason in one line. Core code and
 * core messages read them from here.
 */

/** Lowest temperature searched for critical points and gap temperatures, K (RT = 8.3 J/mol). */
export const T_SEARCH_MIN = 1;
/** Highest temperature searched, K: above every condensed solution the models describe. */
export const T_SEARCH_MAX = 20000;

/**
 * Largest |u| = |ln(x / (1 - x))| solved: x or 1 - x down to e^-700 = 9.9e-305, above the
 * smallest normal double (2.2e-308), so that x y and 1/x keep full precision.
 */
export const U_LIMIT = 700;
/** The dilute limit as messages state it: a composition beyond U_LIMIT is closer than this to a pure component. */
export const DILUTE_LIMIT = '1e-300';
/** What messages suggest when energies look far too large: the usual slip is J/mol entered as kJ/mol. */
export const ENERGY_UNIT_HINT = 'if that is not expected, check the unit of the energies (J/mol entered as kJ/mol makes them 1000 times too large)';
/** And when a gap never opens: kJ/mol entered as J/mol. */
export const ENERGY_UNIT_HINT_SMALL = 'if a gap is expected, check the unit of the energies (kJ/mol entered as J/mol makes them 1000 times too small)';

/** Sampling ranges of the curvature in |u|, tried in turn (the last is U_LIMIT): narrow first, for the grid's resolution. */
export const CURVATURE_RANGES = [40, 160, U_LIMIT] as const;

/** Newton stops after a step below NEWTON_STEP max(1, |u|): with quadratic convergence the error is then below 1e-20. */
export const NEWTON_STEP = 1e-12;
/** A bracket narrower than BRACKET_WIDTH max(1, |u|) (two ulps of a double) cannot shrink further. */
export const BRACKET_WIDTH = 4e-16;
/** The common-tangent slope stops after a step below SLOPE_STEP of its scale (RT + |slopes|): F is then at its rounding. */
export const SLOPE_STEP = 1e-15;

/** Below a fall of g' of NEAR_CRITICAL_DROP RT across an unstable interval (width about 1e-4), the tangent is within the rounding of g': the expansion about the critical point is used. */
export const NEAR_CRITICAL_DROP = 1e-11;

/**
 * Width of the cells of u that make a final solve canonical: 2^-20, an exact binary fraction,
 * far wider than the rounding of a root (about 1e-15), far narrower than what separates roots.
 * A final solve is Newton's method from the midpoint of the root's cell (roots.ts).
 */
export const CELL = 2 ** -20;
/**
 * A root closer than CELL_GUARD (CELL / 32) to a cell boundary is placed by the sign of its
 * function at that boundary alone; farther, by where the final solve put it. Four times the error
 * a final solve is accepted with (ROOT_NOISE), narrow enough that only about 1 final solve in 16
 * needs that extra evaluation.
 */
export const CELL_GUARD = CELL / 32;
/**
 * The rounding of a computed g or g' is taken as at most ROUNDING (2^-46, 64 units in the last
 * place) of the sizes of its terms (those of the ideal part, RT (2 + |u|), and the values of g, g'
 * and the excess part of g'); a final solve is accepted only when the error of the root this
 * allows is below ROOT_NOISE = CELL_GUARD / 4 (else the caller solves the slow way: next to a
 * critical point, where the tangent is ill-conditioned; for the benchmark's systems within 0.3-1 K
 * of it, and 3-10 K for Flory-Huggins, whose terms are about RT / N, far below the RT (2 + |u|)
 * taken for them).
 */
export const ROUNDING = 2 ** -46;
export const ROOT_NOISE = CELL_GUARD / 4;
/** A Newton estimate may start a canonical final solve after a step below ESTIMATE max(1, |u|): its error is then of order 1e-8, within the cell or the next. */
export const ESTIMATE = 1e-4;

/**
 * An extrapolation of a spinodal point from three temperatures is taken as the estimate itself (no
 * Newton step) when its second-order part (quadratic minus linear extrapolation) is below SETTLED:
 * its error, of third order, is then far below a cell (1e-8 in the benchmark's 1000-row table).
 * A worse estimate only costs a longer walk to its cell: the answer is the final solve's. (The
 * gap's estimate always goes to its final solve as it is: a first solve from the estimate's cells
 * finds the root's cells, see roots.ts.)
 */
export const SETTLED = 1e-5;
/** A previous solve seeds a new one when its temperature is within WARM_WINDOW T (farther, a cold start is as fast). */
export const WARM_WINDOW = 0.1;
