/**
 * The model interface every solver is written against.
 *
 * A binary model describes the molar Gibbs energy of mixing g(x, T) of components A and B, x being
 * the mole fraction of B (the volume fraction for Flory–Huggins). Solvers never branch on the model:
 * they ask an `Isotherm` (the model at one temperature) for g and its derivatives.
 *
 * Compositions travel as the pair (x, y) with y = 1 - x computed without cancellation, so that both
 * dilute ends (x -> 0 and x -> 1) keep full relative precision.
 *
 * What a model is called, its card keys and its composition variable are declared beside it, in its
 * `ModelFamily` (./family.ts).
 */
export interface BinaryModel {
  /** A stable text that identifies the parameters, used as a cache key. */
  readonly key: string;
  /**
   * Lattice sites per molecule of A and of B, when g is per mole of sites (Flory–Huggins: the chain
   * lengths N_A, N_B). Absent for mole-fraction models: one each. Chemical potentials per mole of
   * molecules are N_i times the per-site ones (src/core/activity.ts).
   */
  readonly sites?: { readonly A: number; readonly B: number };
  /** The model with its temperature-dependent parameters evaluated at T (kelvin, > 0). */
  at(T: number): Isotherm;
}

/** A binary model at one temperature. Energies in J/mol; x = mole fraction of B, y = 1 - x. */
export interface Isotherm {
  readonly T: number;
  /** R T, J/mol. */
  readonly RT: number;
  /** g(x): molar Gibbs energy of mixing. */
  g(x: number, y: number): number;
  /** dg/dx at fixed T. */
  dg(x: number, y: number): number;
  /** d2g/dx2. */
  d2g(x: number, y: number): number;
  /** d3g/dx3. */
  d3g(x: number, y: number): number;
  /**
   * g'' and g''' at once, into out[0] and out[1] (no allocation; for Newton's method on the
   * curvature): the same bits as d2g and d3g.
   */
  curvatures(x: number, y: number, out: Float64Array): void;
  /**
   * The scaled curvature q = x y g''/RT, computed as (x y d2g(x, y)) / RT with the same bits, at
   * the compositions from index `from` up to (not including) `to` of (x, y), into the same indices
   * of out. One call and one pass for a batch of points (a sampling grid or part of it, the ends of
   * a cell), so that a solver working with several models makes one dispatch for the batch.
   * Each model class writes its own (as `curvatures`): one method shared by all, in a base class,
   * would call d2g through every model's class again, and the compiler would not inline it.
   */
  curvatureEach(x: Float64Array, y: Float64Array, from: number, to: number, out: Float64Array): void;
  /**
   * An upper bound of q = x y g''/RT over the compositions between (xa, ya) and (xb, yb), above q
   * as curvatureEach computes it at any point there, rounding included (so a negative bound means
   * that every such q is negative); Infinity where the model has no cheap bound. For
   * stableIslandBetween, which samples q only where this does not settle it.
   */
  curvatureCeiling(xa: number, ya: number, xb: number, yb: number): number;
  /**
   * g' at the composition of log-ratio u = ln(x / y) (x, y from it), with RT ln(x / y) taken as
   * RT u where the model has that term: the same quantity as dg to rounding, without logarithms.
   * For bounds only (continueMap's near-critical test); results use dg.
   */
  dgRatio(u: number, x: number, y: number): number;
  /**
   * g, g' and g'' at once, into out[0], out[1], out[2] (no allocation; for the solvers' inner
   * loops): the logarithms and the polynomial are computed once. Each is the same bits as g, dg
   * and d2g return, computed by the same operations in the same order.
   */
  derivatives(x: number, y: number, out: Float64Array): void;
}

/** A composition given by its log-ratio u = ln(x / y): x and y = 1 - x, both to full precision. */
export interface Point {
  u: number;
  x: number;
  y: number;
}

/**
 * x and y = 1 - x from u = ln(x / y), without cancellation at either end, written into out[0] and
 * out[1] (no object: for the solvers' inner loops).
 */
export function splitRatio(u: number, out: Float64Array): void {
  const e = Math.exp(-Math.abs(u));
  out[0] = u < 0 ? e / (1 + e) : 1 / (1 + e);
  out[1] = u < 0 ? 1 / (1 + e) : e / (1 + e);
}

const xy = new Float64Array(2);

/** x and y = 1 - x from u = ln(x / y), as a Point. */
export function pointAt(u: number): Point {
  splitRatio(u, xy);
  return { u, x: xy[0], y: xy[1] };
}

/** u = ln(x / (1 - x)) for 0 < x < 1. */
export function logRatio(x: number): number {
  return x < 0.5 ? Math.log(x) - Math.log1p(-x) : Math.log(x / (1 - x));
}

/** Chemical potential of A relative to pure A: mu_A = g - x g'. */
export function muA(iso: Isotherm, x: number, y: number): number {
  return iso.g(x, y) - x * iso.dg(x, y);
}

/** Chemical potential of B relative to pure B: mu_B = g + (1 - x) g'. */
export function muB(iso: Isotherm, x: number, y: number): number {
  return iso.g(x, y) + y * iso.dg(x, y);
}
