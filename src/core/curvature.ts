import { fail, kelvin, msg } from './errors';
import type { Isotherm, Point } from './model';
import { pointAt, splitRatio } from './model';
import { CELL, CURVATURE_RANGES as RANGES, DILUTE_LIMIT, ENERGY_UNIT_HINT, NEWTON_STEP } from './limits';
import { brentMin, brentRoot, type SignCell } from './roots';

/**
 * Scaled curvature q(u) = x y g''(x) / (R T) as a function of u = ln(x / y).
 * q has the sign of g'' and tends to the ideal-solution value 1 (or the Flory–Huggins end values)
 * at both dilute ends, so it is well scaled over the whole composition range.
 *   dq/du = x y [(y - x) g'' + x y g'''] / (R T)
 */
export function curvature(iso: Isotherm, p: Point): number {
  return scaledCurvature(iso, p.x, p.y);
}

export function curvatureSlope(iso: Isotherm, p: Point): number {
  return scaledCurvatureSlope(iso, p.x, p.y);
}

function scaledCurvature(iso: Isotherm, x: number, y: number): number {
  return (x * y * iso.d2g(x, y)) / iso.RT;
}

function scaledCurvatureSlope(iso: Isotherm, x: number, y: number): number {
  iso.curvatures(x, y, curv);
  return (x * y * ((y - x) * curv[0] + x * y * curv[1])) / iso.RT;
}
/** g'' and g''' from Isotherm.curvatures. */
const curv = new Float64Array(2);

/** A batch of two points for Isotherm.curvatureEach (the ends of a grid or of a cell) and q there (scaledCurvature's bits). */
const pairX = new Float64Array(2), pairY = new Float64Array(2), pairQ = new Float64Array(2);

/** q at (xa, ya) and (xb, yb) into pairQ, in one model call. */
function curvaturePair(iso: Isotherm, xa: number, ya: number, xb: number, yb: number): void {
  pairX[0] = xa; pairY[0] = ya; pairX[1] = xb; pairY[1] = yb;
  iso.curvatureEach(pairX, pairY, 0, 2, pairQ);
}

/** A local minimum of q, refined. */
export interface CurvatureMinimum {
  point: Point;
  q: number;
}

/** The unstable intervals (g'' < 0) at one temperature and the local minima of q found on the way. */
export interface CurvatureMap {
  /** The smaller of q at the two sampled ends: the scale of q for this model. */
  scale: number;
  /** Spinodal points, sorted by x: pairs [2i, 2i+1] bound the i-th unstable interval. */
  spinodal: Point[];
  /** Every local minimum of q (refined), sorted by x. */
  minima: CurvatureMinimum[];
}

/** A sampling grid in u: dense near x = 1/2 (u = 0), sparse towards the dilute ends. */
interface Grid {
  points: Point[];
  u: Float64Array;
  x: Float64Array;
  y: Float64Array;
}

/** The grid of each sampling range (RANGES[r]), built when first asked for. */
const grids: Array<Grid | undefined> = RANGES.map(() => undefined);

/** The grid of range r: u = a sinh(b t), t uniform in [-1, 1], spacing 0.1 at u = 0, reaching |u| = RANGES[r] at the ends. */
function gridAt(r: number): Grid {
  let grid = grids[r];
  if (grid) return grid;
  const U = RANGES[r];
  const N = 141;
  const du0 = 0.1;
  // a b = du0 (N - 1) / 2 and a sinh(b) = U: solve sinh(b)/b = U / (a b) for b by bisection.
  const ab = (du0 * (N - 1)) / 2;
  let lo = 1e-6, hi = 50;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (Math.sinh(mid) / mid < U / ab) lo = mid; else hi = mid;
  }
  const b = 0.5 * (lo + hi), a = ab / b;
  const points: Point[] = [];
  for (let i = 0; i < N; i++) points.push(pointAt(a * Math.sinh(b * (-1 + (2 * i) / (N - 1)))));
  grid = {
    points,
    u: Float64Array.from(points, (p) => p.u),
    x: Float64Array.from(points, (p) => p.x),
    y: Float64Array.from(points, (p) => p.y),
  };
  grids[r] = grid;
  return grid;
}

/** Scratch space for the sampled q (analyse() reads it before any further call can overwrite it). */
const qBuffer = new Float64Array(256);


/**
 * Finds every spinodal point (root of g'') and every local minimum of q at one temperature.
 * Sampling finds sign changes; each sampled local minimum (maximum) of q is refined, so an
 * unstable interval narrower than the sampling step (near a critical point) is not missed.
 * With `refineAll` false, minima that are already negative are not refined (the binodal solver
 * does not need their depth).
 */
export function curvatureMap(iso: Isotherm, refineAll = true): CurvatureMap {
  for (let r = 0; r < RANGES.length; r++) {
    const { points, x, y } = gridAt(r);
    const n = points.length;
    const q = n <= qBuffer.length ? qBuffer.subarray(0, n) : new Float64Array(n);
    iso.curvatureEach(x, y, 0, n, q);
    if (!(q[0] > 0 && q[n - 1] > 0)) {
      if (Number.isNaN(q[0]) || Number.isNaN(q[n - 1])) fail('range', msg`the model overflows at T = ${kelvin(iso.T)}: its parameters are too large for this temperature`);
      continue; // still unstable at the sampled ends: sample wider
    }
    return analyse(iso, points, q, refineAll);
  }
  return fail('range', msg`the solution is unstable even at x = ${DILUTE_LIMIT} at T = ${kelvin(iso.T)}: the parameters are too large for this temperature; ${ENERGY_UNIT_HINT}`);
}

function analyse(iso: Isotherm, points: Point[], q: Float64Array, refineAll: boolean): CurvatureMap {
  const spinodal: Point[] = [];
  const minima: CurvatureMinimum[] = [];
  const scale = Math.min(q[0], q[q.length - 1]);
  // q and dq/du at u, without Point objects (these run in root searches)
  const xy = new Float64Array(2);
  const root = (u0: number, u1: number, q0: number, q1: number) => {
    spinodal.push(pointAt(spinodalRoot(iso, u0, u1, q0, q1)));
  };
  for (let i = 0; i + 1 < q.length; i++) {
    if (q[i] > 0 !== q[i + 1] > 0) root(points[i].u, points[i + 1].u, q[i], q[i + 1]);
    if (i === 0) continue;
    const isMin = q[i] <= q[i - 1] && q[i] < q[i + 1];
    const isMax = q[i] >= q[i - 1] && q[i] > q[i + 1];
    // q tends to its entropic values at the two ends (1 for mole-fraction models, 1/N for chains).
    // A sampled minimum above half of the smaller one cannot reach zero within one step of the
    // grid for any model of reasonable order; those are refined only when asked for.
    if (isMin && ((q[i] > 0 && q[i] < 0.5 * scale) || refineAll)) {
      const m = refineExtremum(iso, points[i - 1].u, points[i + 1].u, 1);
      minima.push({ point: pointAt(m.u), q: m.q });
      if (q[i] > 0 && m.q < 0) {
        // a narrow unstable interval between samples
        root(points[i - 1].u, m.u, q[i - 1], m.q);
        root(m.u, points[i + 1].u, m.q, q[i + 1]);
      }
    } else if (isMax && q[i] <= 0) {
      const m = refineExtremum(iso, points[i - 1].u, points[i + 1].u, -1);
      if (m.q > 0) {
        // a narrow stable island between samples splits one unstable interval in two
        root(points[i - 1].u, m.u, q[i - 1], m.q);
        root(m.u, points[i + 1].u, m.q, q[i + 1]);
      }
    }
  }
  spinodal.sort((a, b) => a.u - b.u);
  if (spinodal.length % 2 !== 0) fail('convergence', msg`odd number of spinodal points at T = ${kelvin(iso.T)}`);
  return { spinodal, minima, scale };
}

/**
 * The root of q in [u0, u1] (q0, q1 of opposite signs), the same bits from any start: Brent's
 * method to 1e-9 for an estimate, then Newton in the root's 2^-20 cell (canonicalRoot). Two roots
 * within one cell (next to a critical point) keep Brent's method to 1e-14 on the bracket alone.
 */
function spinodalRoot(iso: Isotherm, u0: number, u1: number, q0: number, q1: number): number {
  const qAt = (t: number) => { splitRatio(t, xyRoot); return scaledCurvature(iso, xyRoot[0], xyRoot[1]); };
  const rough = brentRoot(qAt, u0, u1, q0, q1, 1e-9);
  const polished = Number.isNaN(rough) ? undefined : canonicalRoot(iso, rough, q0 > 0 ? -1 : 1);
  if (polished !== undefined) return polished;
  const u = brentRoot(qAt, u0, u1, q0, q1, 1e-14);
  if (Number.isNaN(u)) fail('convergence', msg`spinodal root search failed at T = ${kelvin(iso.T)}`);
  return u;
}
const xyRoot = new Float64Array(2);
const slopeRoot = new Float64Array(1);

/** State of canonicalRoot's functions, at module level so that they allocate nothing. */
let rootIso: Isotherm;
let rootSign = 1;
const rootCell: SignCell = { a: 0, b: 0, fa: 0, fb: 0 };
function signedQ(t: number): number {
  splitRatio(t, xyRoot);
  return rootSign * scaledCurvature(rootIso, xyRoot[0], xyRoot[1]);
}
function signedQNewton(t: number, out: Float64Array): number {
  splitRatio(t, xyRoot);
  const iso = rootIso, x = xyRoot[0], y = xyRoot[1];
  iso.curvatures(x, y, curv);
  const d2 = curv[0];
  // scaledCurvatureSlope and scaledCurvature, with g'' computed once
  out[0] = rootSign * ((x * y * ((y - x) * d2 + x * y * curv[1])) / iso.RT);
  return rootSign * ((x * y * d2) / iso.RT);
}
/** signedQ at both ends of cell i, into pairQ (one model call). */
function signedQEnds(i: number): void {
  splitRatio(i * CELL, xyRoot);
  const xa = xyRoot[0], ya = xyRoot[1];
  splitRatio((i + 1) * CELL, xyRoot);
  curvaturePair(rootIso, xa, ya, xyRoot[0], xyRoot[1]);
  pairQ[0] *= rootSign;
  pairQ[1] *= rootSign;
}

/** signCell (roots.ts) of signedQ, its own copy of the rule (see there). */
function signCellQ(estimate: number, out: SignCell): SignCell | undefined {
  let i = Math.floor(estimate / CELL);
  signedQEnds(i);
  let fa = pairQ[0], fb = pairQ[1];
  for (let walk = 0; walk < 16; walk++) {
    if (fa < 0 && fb >= 0) {
      out.a = i * CELL; out.b = (i + 1) * CELL; out.fa = fa; out.fb = fb;
      return out;
    }
    if (!(fa === fa && fb === fb) || (fa >= 0 && fb < 0)) return undefined;
    if (fa >= 0) { i--; fb = fa; fa = signedQ(i * CELL); } else { i++; fa = fb; fb = signedQ((i + 1) * CELL); }
  }
  return undefined;
}

/** cellNewton (roots.ts) of signedQNewton, its own copy of the rule (see there). */
function cellNewtonQ(cell: SignCell, out: Float64Array): number | undefined {
  let lo = cell.a, hi = cell.b;
  let t = cell.a - (cell.fa * (cell.b - cell.a)) / (cell.fb - cell.fa);
  if (!(t > lo && t < hi)) t = 0.5 * (lo + hi);
  for (let iter = 0; iter < 60; iter++) {
    const f = signedQNewton(t, out);
    if (f === 0) return t;
    if (f < 0) lo = t; else hi = t;
    const step = f / out[0];
    if (Math.abs(step) <= NEWTON_STEP * Math.max(1, Math.abs(t))) return Math.min(Math.max(t - step, lo), hi);
    let next = t - step;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (next === t) return t;
    t = next;
  }
  return undefined;
}

/**
 * The root of q near `estimate` where sign * q rises through zero, by Newton's method in its sign
 * cell (roots.ts): the result depends on the cell alone, not on the estimate.
 */
function canonicalRoot(iso: Isotherm, estimate: number, sign: 1 | -1): number | undefined {
  rootIso = iso;
  rootSign = sign;
  const cell = signCellQ(estimate, rootCell);
  return cell && cellNewtonQ(cell, slopeRoot);
}

/** The sampling grid curvatureMap chooses at this temperature (q > 0 at both ends), remembered for the last isotherm asked. */
function samplingGrid(iso: Isotherm): Grid | undefined {
  if (iso === gridIso) return gridChosen;
  gridIso = iso;
  gridChosen = undefined;
  for (let r = 0; r < RANGES.length; r++) {
    const grid = gridAt(r), { x, y } = grid, n = x.length;
    curvaturePair(iso, x[0], y[0], x[n - 1], y[n - 1]);
    const q0 = pairQ[0], qn = pairQ[1];
    if (q0 > 0 && qn > 0) return (gridChosen = grid);
    if (Number.isNaN(q0) || Number.isNaN(qn)) break;
  }
  return undefined;
}
let gridIso: Isotherm | undefined;
let gridChosen: Grid | undefined;
/** The grid cells of spinodalRootNear's last two estimates (of any grid: checked before use). */
const lastCells = new Int32Array(2);

/**
 * The spinodal point that curvatureMap would give for a root of q near `estimate`, without
 * sampling the whole grid: the sampling range curvatureMap would choose (q > 0 at both ends) and
 * the grid cell holding the estimate; when q changes sign across that cell, the root's final
 * solve from the estimate (the same bits as curvatureMap's). Undefined when it does not (the root may lie in the
 * next cell, or two roots share one: the caller samples the whole grid).
 */
export function spinodalRootNear(iso: Isotherm, estimate: number): number | undefined {
  const grid = samplingGrid(iso);
  if (!grid) return undefined;
  const { u, x, y } = grid;
  const n = u.length;
  if (!(estimate > u[0] && estimate < u[n - 1])) return undefined;
  // the grid cell holding the estimate (u[lo] < estimate <= u[hi]): usually one of the last two
  // calls' (a sweep asks for its two spinodal points in turn, each moving little)
  let lo = lastCells[0], hi = lo + 1;
  if (!(hi < n && u[lo] < estimate && estimate <= u[hi])) {
    lo = lastCells[1]; hi = lo + 1;
    if (!(hi < n && u[lo] < estimate && estimate <= u[hi])) {
      lo = 0; hi = n - 1;
      while (hi - lo > 1) {
        const mid = (lo + hi) >> 1;
        if (u[mid] < estimate) lo = mid; else hi = mid;
      }
    }
  }
  lastCells[1] = lastCells[0];
  lastCells[0] = lo;
  curvaturePair(iso, x[lo], y[lo], x[hi], y[hi]);
  const qa = pairQ[0], qb = pairQ[1];
  if (qa > 0 === qb > 0) return undefined;
  return canonicalRoot(iso, estimate, qa > 0 ? -1 : 1) ?? spinodalRoot(iso, u[lo], u[hi], qa, qb);
}

/** The number of nodes of the sorted u below t (below or at t when `strict` is false). */
function nodesBelow(u: Float64Array, t: number, strict: boolean): number {
  let lo = 0, hi = u.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (strict ? u[mid] < t : u[mid] <= t) lo = mid + 1; else hi = mid;
  }
  return lo;
}

/** q at the grid nodes strictly between two spinodal points (stableIslandBetween), at the nodes' indices. */
const innerQ = new Float64Array(256);

/**
 * Whether curvatureMap, at this temperature, would find more spinodal points between s1 < s2 (the
 * two ends of one unstable interval): a stable island inside it, which opens where a local maximum
 * of q rises through zero, with no critical point (no gap closes there). analyse's rules on the
 * grid nodes strictly between s1 and s2 (q there is computed as curvatureMap computes it): q > 0
 * at a node (two more sign changes), or a sampled local maximum with q <= 0 whose refinement is
 * above zero. (Nodes outside [s1, s2] are not sampled: an unstable interval appears there only
 * where a minimum of q crosses zero, at the temperatures criticalSearch lists as crossings, which
 * a table does not follow across.) True when the grid is not the one curvatureMap would choose.
 * Where the model's curvatureCeiling over the first to the last of those nodes is negative, every
 * q analyse could compute there (at a node or a refined maximum, all within that stretch) is
 * negative: false without sampling (a sweep's usual row).
 */
export function stableIslandBetween(iso: Isotherm, s1: number, s2: number): boolean {
  const grid = samplingGrid(iso);
  if (!grid) return true;
  const { u, x, y } = grid;
  const n = u.length;
  // the nodes lo..hi strictly inside (s1, s2)
  // the first node above s1 and the last below s2: usually the inner ends of the grid cells of the
  // last two spinodalRootNear calls (their estimates' cells, which hold s1 and s2)
  let lo = lastCells[1] + 1, hi = lastCells[0];
  if (!(lo > 0 && lo < n && u[lo - 1] <= s1 && s1 < u[lo])) lo = nodesBelow(u, s1, false);
  if (!(hi >= 0 && hi + 1 < n && u[hi] < s2 && s2 <= u[hi + 1])) hi = nodesBelow(u, s2, true) - 1;
  if (hi < lo) return false;
  // q below zero over all of [u[lo], u[hi]] by the model's bound: no node or refined maximum is above it
  if (iso.curvatureCeiling(x[lo], y[lo], x[hi], y[hi]) < 0) return false;
  const q = n <= innerQ.length ? innerQ : new Float64Array(n);
  iso.curvatureEach(x, y, lo, hi + 1, q);
  for (let k = lo; k <= hi; k++) {
    if (q[k] > 0) return true;
    if (k > lo && k < hi && q[k] >= q[k - 1] && q[k] > q[k + 1] && refineExtremum(iso, u[k - 1], u[k + 1], -1).q > 0) return true;
  }
  return false;
}

/**
 * Refines a local minimum (sign 1) or maximum (sign -1) of q on [u0, u1], widened up to
 * `widenings` times: root of dq/du, or a bounded search.
 */
export function refineExtremum(
  iso: Isotherm, u0: number, u1: number, sign: 1 | -1, widenings = 0, tol = 1e-13,
): { u: number; q: number } {
  const slope = (u: number) => sign * curvatureSlope(iso, pointAt(u));
  let s0 = slope(u0), s1 = slope(u1);
  // widen geometrically until dq/du brackets the extremum (it may lie outside the first guess)
  for (let k = 0, step = 0.5 * (u1 - u0); k < widenings && !(s0 < 0 && s1 > 0); k++, step *= 2) {
    if (s0 >= 0) { u0 -= step; s0 = slope(u0); }
    if (s1 <= 0) { u1 += step; s1 = slope(u1); }
  }
  let u: number;
  if (s0 < 0 && s1 > 0) u = brentRoot(slope, u0, u1, s0, s1, tol);
  else u = brentMin((t) => sign * curvature(iso, pointAt(t)), u0, u1, 1e-13).t;
  return { u, q: curvature(iso, pointAt(u)) };
}
