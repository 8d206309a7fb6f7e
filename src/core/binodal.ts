import { curvatureMap, spinodalRootNear, stableIslandBetween } from './curvature';
import { fail, kelvin, MixgapError, msg } from './errors';
import type { Isotherm, Point } from './model';
import { logRatio, muA, pointAt, splitRatio } from './model';
import { BRACKET_WIDTH, CELL, DILUTE_LIMIT, ENERGY_UNIT_HINT, ESTIMATE, SETTLED, NEAR_CRITICAL_DROP, NEWTON_STEP, ROOT_NOISE, ROUNDING, SLOPE_STEP, U_LIMIT } from './limits';
import { cellBeside, clearCell } from './roots';

/** One miscibility gap at a temperature: the two coexisting compositions and their common tangent. */
export interface Gap {
  /** A-rich boundary x' (lower mole fraction of B). */
  low: Point;
  /** B-rich boundary x''. */
  high: Point;
  /** Slope of the common tangent, g'(x') = g'(x''), J/mol. */
  slope: number;
}

/** Everything known about one temperature: gaps and unstable intervals, both numbered from low x. */
export interface PhaseMap {
  T: number;
  gaps: Gap[];
  /** Spinodal points; pairs [2i, 2i+1] bound the i-th unstable interval. */
  spinodal: Point[];
}

/**
 * A convex stretch of g between unstable intervals, [a, b] in u = ln(x / y). On it g' is increasing,
 * so for each tangent slope m in (g'(a), g'(b)) there is exactly one point with g' = m.
 */
export interface Branch {
  a: number;
  b: number;
  /** g' at the branch's low end a and at its high end b (-Infinity and +Infinity at the dilute ends). */
  slopeLow: number;
  slopeHigh: number;
  /** Last point solved on this branch: the starting guess of the next solve. */
  guess: number;
}

/**
 * Every miscibility gap at one temperature.
 *
 * The gaps are where the lower convex envelope of g leaves the curve. For a tangent slope m the
 * envelope touches g where h(x) = g(x) - m x is smallest; the candidates are the points with
 * g'(x) = m on the convex branches, one per branch, with h = mu_A there. As m rises, the touching
 * point moves to higher x; it jumps from branch j to branch k (a gap) at the slope where
 *   F(m) = mu_A(x_j(m)) - mu_A(x_k(m)) = 0,  dF/dm = x_k - x_j > 0,
 * i.e. mu_A and mu_B (= mu_A + m) are equal in both phases: the common tangent. F is monotone,
 * so each jump is a bracketed one-dimensional root. Sweeping m from -infinity finds every gap,
 * including several at one temperature, and never returns a tangent that cuts g elsewhere.
 */
export function phaseMap(iso: Isotherm, hint?: PhaseMap): PhaseMap {
  const { spinodal } = curvatureMap(iso, false);
  if (spinodal.length === 0) return { T: iso.T, gaps: [], spinodal };
  // A nearby temperature with the same structure gives the starting points of every solve; the
  // answer does not depend on it (every gap ends in canonicalGap), and when a final solve cannot
  // be made canonical the whole sweep is done again without it.
  const warm = hint && hint.spinodal.length === spinodal.length && hint.gaps.length > 0 ? hint : undefined;
  const branches = convexBranches(iso, spinodal);
  if (warm?.gaps.length === 1 && branches.length === 2 && !nearCritical(iso, branches[0], branches[1])) {
    const gap = tangentNewton(iso, warm.gaps[0].low.u, warm.gaps[0].high.u, spinodal[0].u, spinodal[1].u)
      ? canonicalGap(iso, branches[0], branches[1], tangentEstimate[0], tangentEstimate[1]) : undefined;
    if (gap) return { T: iso.T, gaps: [gap], spinodal };
  }
  const gaps = (warm && sweep(iso, convexBranches(iso, spinodal), warm)) || sweep(iso, branches);
  return { T: iso.T, gaps: gaps as Gap[], spinodal };
}

/**
 * The sweep of tangent slopes over the convex branches (see phaseMap). With `warm`, the gaps of a
 * nearby temperature start the solves, and undefined is returned if a gap's final solve cannot be
 * made canonical (the caller sweeps again without it, so that the answer never depends on `warm`).
 */
function sweep(iso: Isotherm, branches: Branch[], warm?: PhaseMap): Gap[] | undefined {
  const gaps: Gap[] = [];
  if (branches.length < 2) return gaps;
  if (warm?.gaps.length === 1 && branches.length === 2) {
    branches[0].guess = warm.gaps[0].low.u;
    branches[1].guess = warm.gaps[0].high.u;
  }
  let active = 0;
  let mFrom = -Infinity;
  while (active < branches.length - 1) {
    let best: { m: number; k: number; nearCritical?: boolean } | undefined;
    for (let k = active + 1; k < branches.length; k++) {
      const j = branches[active], next = branches[k];
      if (k === active + 1 && nearCritical(iso, j, next)) {
        const m = 0.5 * (j.slopeHigh + next.slopeLow);
        if (m > mFrom && (best === undefined || m < best.m)) best = { m, k, nearCritical: true };
        continue;
      }
      // With two branches only, the envelope must pass from one to the other: no need to test.
      const sure = branches.length === 2;
      const m = crossing(iso, j, next, mFrom, sure, warm?.gaps[gaps.length]?.slope);
      if (m !== undefined && (best === undefined || m < best.m)) best = { m, k };
    }
    if (best === undefined) fail('convergence', msg`the common-tangent sweep lost the envelope at T = ${kelvin(iso.T)}`);
    if (best.nearCritical) {
      gaps.push(criticalGap(iso, branches[active].b, branches[best.k].a));
    } else {
      const u1 = solveSlope(iso, branches[active], best.m);
      const u2 = solveSlope(iso, branches[best.k], best.m);
      const gap = canonicalGap(iso, branches[active], branches[best.k], u1, u2);
      if (!gap && warm) return undefined;
      gaps.push(gap ?? { low: pointAt(u1), high: pointAt(u2), slope: best.m });
    }
    active = best.k;
    mFrom = best.m;
  }
  return gaps;
}

/**
 * Near a critical point g' falls by only about RT w^3 across an unstable interval of width w, and
 * below about 1e-11 RT (w of order 1e-4) that drop is too close to the rounding of g' itself
 * (about 1e-16 of its terms) for the common tangent to be solved from g'. There the leading
 * order of the expansion about the critical point is used instead (see criticalGap).
 */
function nearCritical(iso: Isotherm, j: Branch, k: Branch): boolean {
  return j.slopeHigh - k.slopeLow < NEAR_CRITICAL_DROP * iso.RT;
}

/**
 * The gap of a small unstable interval [s1, s2] next to a critical point, to leading order of the
 * expansion of g about it (fourth order in x - xc): the binodal half-width is sqrt(3) times the
 * spinodal half-width about the same centre, x = c +- sqrt(3) h, with an error of order h^2
 * (for the regular solution, of order h^3), below 1e-8 wherever this is used.
 */
function criticalGap(iso: Isotherm, s1: number, s2: number): Gap {
  const a = pointAt(s1), b = pointAt(s2);
  const c = 0.5 * (a.x + b.x), h = 0.5 * (b.x - a.x);
  const xLow = c - Math.sqrt(3) * h, xHigh = c + Math.sqrt(3) * h;
  if (!(xLow > 0 && xHigh < 1)) fail('convergence', msg`a near-critical gap next to a pure component at T = ${kelvin(iso.T)} cannot be resolved`);
  const low = pointAt(logRatio(xLow)), high = pointAt(logRatio(xHigh));
  return { low, high, slope: iso.dg(c, 1 - c) };
}

const xyCell = new Float64Array(2);

/** Scratch for g, g', g'' (Isotherm.derivatives), one per caller so that none overwrites another's. */
const derSlope = new Float64Array(3), derCell1 = new Float64Array(3), derCell2 = new Float64Array(3), derSide = new Float64Array(3), derEstimate1 = new Float64Array(3), derEstimate2 = new Float64Array(3), derSolve = new Float64Array(3);

/**
 * newtonSlope's results, in a typed array (a module-level `let` holding a double allocates on every
 * write): the root, and the error the rounding of g' allows there.
 */
const slopeOut = new Float64Array(2);

/**
 * newton (roots.ts) of g'(u) - m from the midpoint of cell i, its own copy of the rule (see there):
 * the root into slopeOut[0] and the error the rounding of g' allows into slopeOut[1] (the terms of
 * g' taken as of size RT (2 + |u|) + |g'| + |g' - RT u| + |m|). False when a step leaves the
 * branch, the slope d g'/du = x y g'' at the last point is not positive, or it does not settle.
 */
function newtonSlope(iso: Isotherm, br: Branch, m: number, i: number): boolean {
  let t = (i + 0.5) * CELL;
  for (let iter = 0; iter < 30; iter++) {
    if (!(t > br.a && t < br.b && Math.abs(t) < U_LIMIT)) return false;
    splitRatio(t, xyCell);
    const x = xyCell[0], y = xyCell[1];
    iso.derivatives(x, y, derSlope);
    const c = x * y * derSlope[2];
    const step = (derSlope[1] - m) / c;
    if (!Number.isFinite(step)) return false;
    if (Math.abs(step) <= NEWTON_STEP * Math.max(1, Math.abs(t))) {
      slopeOut[0] = t - step;
      slopeOut[1] = (ROUNDING * (iso.RT * (2 + Math.abs(t)) + Math.abs(derSlope[1]) + Math.abs(derSlope[1] - iso.RT * t) + Math.abs(m))) / c;
      return c > 0;
    }
    t -= step;
  }
  return false;
}

/**
 * The point of branch `br` where g' = m, the same bits from any estimate near it: the canonical
 * final solve of roots.ts (its own copy of the rule; the sign at a boundary is that of g' - m).
 * Undefined when it cannot be made canonical or its cell leaves the branch.
 */
function canonicalSlopePoint(iso: Isotherm, br: Branch, m: number, estimate: number): number | undefined {
  let i = Math.floor(estimate / CELL);
  for (let attempt = 0; attempt < 2; attempt++) {
    if (!newtonSlope(iso, br, m, i)) return undefined;
    const r = slopeOut[0];
    let k = clearCell(r);
    if (k !== k) {
      const ib = Math.round(r / CELL);
      splitRatio(ib * CELL, xyCell);
      k = cellBeside(ib, iso.dg(xyCell[0], xyCell[1]) - m);
    }
    if (k === i) return slopeOut[1] <= ROOT_NOISE && i * CELL > br.a && (i + 1) * CELL < br.b ? r : undefined;
    i = k;
  }
  return undefined;
}

/**
 * newtonTangent's results: u' and u'' of the common tangent, and the errors the rounding of the
 * equations allows in each.
 */
const tangentOut = new Float64Array(4);

/**
 * One Newton step on the common-tangent equations at (u', u'') = (u1, u2):
 *   G1 = g'(x') - g'(x'') = 0,  G2 = mu_A(x') - mu_A(x'') = 0,
 * with d g'/du = c = x y g'' and d mu_A/du = -x c. Writes du', du'', x', x'', c', c'' into
 * `stepOut` and g, g', g'' at each point into der1, der2 (no allocation), for newtonTangent and tangentNewton.
 */
function tangentStep(iso: Isotherm, u1: number, u2: number, der1: Float64Array, der2: Float64Array): void {
  splitRatio(u1, xyCell);
  const x1 = xyCell[0], y1 = xyCell[1];
  splitRatio(u2, xyCell);
  const x2 = xyCell[0], y2 = xyCell[1];
  iso.derivatives(x1, y1, der1);
  iso.derivatives(x2, y2, der2);
  const d1 = der1[1], d2 = der2[1];
  const G1 = d1 - d2;
  const G2 = der1[0] - x1 * d1 - (der2[0] - x2 * d2);
  const c1 = x1 * y1 * der1[2], c2 = x2 * y2 * der2[2];
  // c1 du1 - c2 du2 = -G1;  -x1 c1 du1 + x2 c2 du2 = -G2
  const b = -(G2 + x1 * G1) / (x2 - x1);
  stepOut[0] = (b - G1) / c1;
  stepOut[1] = b / c2;
  stepOut[2] = x1; stepOut[3] = x2; stepOut[4] = c1; stepOut[5] = c2;
}
const stepOut = new Float64Array(6);

/**
 * newton (roots.ts) of the common-tangent equations in (u', u'') jointly (as tangentNewton), from the
 * midpoints of cells i1 (branch j) and i2 (branch k), its own copy of the rule in two unknowns: it
 * stops when both steps are below NEWTON_STEP max(1, |u|). The error bound: the equations' rounding
 * (ROUNDING of RT (4 + |u'| + |u''|) + |g| + |g'| + |g' - RT u| at both points) through the inverse
 * Jacobian, at most that over c (x'' - x') for each (c = x y g''). False when a step leaves a
 * branch, c is not positive at the last point, or it does not settle.
 */
function newtonTangent(iso: Isotherm, j: Branch, k: Branch, i1: number, i2: number): boolean {
  let u1 = (i1 + 0.5) * CELL, u2 = (i2 + 0.5) * CELL;
  for (let iter = 0; iter < 30; iter++) {
    if (!(u1 > j.a && u1 < j.b && u2 > k.a && u2 < k.b && u1 > -U_LIMIT && u2 < U_LIMIT)) return false;
    tangentStep(iso, u1, u2, derCell1, derCell2);
    const du1 = stepOut[0], du2 = stepOut[1], x1 = stepOut[2], x2 = stepOut[3], c1 = stepOut[4], c2 = stepOut[5];
    const d1 = derCell1[1], d2 = derCell2[1];
    if (!Number.isFinite(du1) || !Number.isFinite(du2)) return false;
    if (Math.abs(du1) <= NEWTON_STEP * Math.max(1, Math.abs(u1)) && Math.abs(du2) <= NEWTON_STEP * Math.max(1, Math.abs(u2))) {
      const RT = iso.RT;
      const noise = (ROUNDING * (RT * (4 + Math.abs(u1) + Math.abs(u2)) + Math.abs(derCell1[0]) + Math.abs(derCell2[0]) + Math.abs(d1) + Math.abs(d2)
        + Math.abs(d1 - RT * u1) + Math.abs(d2 - RT * u2))) / (x2 - x1);
      tangentOut[0] = u1 + du1;
      tangentOut[1] = u2 + du2;
      tangentOut[2] = noise / c1;
      tangentOut[3] = noise / c2;
      return c1 > 0 && c2 > 0 && x2 > x1;
    }
    u1 += du1;
    u2 += du2;
  }
  return false;
}

/**
 * The cell of the common tangent's u' (`low`) or u'' from (r1, r2) within the solve's error of it
 * (roots.ts). Near a boundary b the sign is that of F(g'(b)) = mu_A(x_j) - mu_A(x_k) at the slope
 * g'(b), with the other point where g' = g'(b) on its branch (canonicalSlopePoint): F rises with the
 * slope, so F < 0 puts the root above b. NaN when that point is not found.
 */
function tangentCell(iso: Isotherm, j: Branch, k: Branch, r1: number, r2: number, low: boolean): number {
  const r = low ? r1 : r2;
  const i = clearCell(r);
  if (i === i) return i;
  const ib = Math.round(r / CELL), b = ib * CELL;
  splitRatio(b, xyCell);
  const xb = xyCell[0];
  iso.derivatives(xb, xyCell[1], derSide);
  const m = derSide[1], muB = derSide[0] - xb * m;
  const other = low ? canonicalSlopePoint(iso, k, m, r2) : canonicalSlopePoint(iso, j, m, r1);
  if (other === undefined) return NaN;
  splitRatio(other, xyCell);
  const xo = xyCell[0];
  iso.derivatives(xo, xyCell[1], derSide);
  const muOther = derSide[0] - xo * m;
  const F = low ? muB - muOther : muOther - muB;
  return cellBeside(ib, F);
}

/**
 * The gap between branches j and k, the same bits from any estimate (u1, u2) close to it: what a
 * warm start or the sweep found only chooses where the work starts. The canonical final solve of
 * roots.ts in two unknowns: Newton on the common-tangent equations from the midpoints of the cells
 * of u' and u'' (newtonTangent), each cell found as in roots.ts (tangentCell). Undefined when it
 * cannot be made canonical (the caller keeps its own answer or solves again from scratch), or near
 * U_LIMIT (its own solve says why).
 */
export function canonicalGap(iso: Isotherm, j: Branch, k: Branch, u1: number, u2: number): Gap | undefined {
  if (!canonicalTangent(iso, j, k, u1, u2)) return undefined;
  const low = pointAt(tangentRoot[0]);
  return { low, high: pointAt(tangentRoot[1]), slope: iso.dg(low.x, low.y) };
}

/** canonicalTangent's answer: u' and u'' of the gap. */
const tangentRoot = new Float64Array(2);

/** canonicalGap's solve, its answer (u', u'') into tangentRoot: false where canonicalGap is undefined. */
function canonicalTangent(iso: Isotherm, j: Branch, k: Branch, u1: number, u2: number): boolean {
  if (!(Math.abs(u1) < U_LIMIT - 1 && Math.abs(u2) < U_LIMIT - 1)) return false;
  let i1 = Math.floor(u1 / CELL), i2 = Math.floor(u2 / CELL);
  for (let attempt = 0; attempt < 2; attempt++) {
    if (!newtonTangent(iso, j, k, i1, i2)) return false;
    const r1 = tangentOut[0], r2 = tangentOut[1], noise1 = tangentOut[2], noise2 = tangentOut[3];
    const k1 = tangentCell(iso, j, k, r1, r2, true), k2 = tangentCell(iso, j, k, r1, r2, false);
    if (k1 === i1 && k2 === i2) {
      if (!(noise1 <= ROOT_NOISE && noise2 <= ROOT_NOISE && i1 * CELL > j.a && (i1 + 1) * CELL < j.b && i2 * CELL > k.a && (i2 + 1) * CELL < k.b)) return false;
      tangentRoot[0] = r1;
      tangentRoot[1] = r2;
      return true;
    }
    i1 = k1;
    i2 = k2;
  }
  return false;
}

/**
 * An estimate of the one gap between two convex branches, from the gap of a nearby temperature:
 * Newton on the common-tangent equations in (u', u'') jointly,
 *   G1 = g'(x') - g'(x'') = 0,  G2 = mu_A(x') - mu_A(x'') = 0,
 * with d g'/du = c = x y g'' and d mu_A/du = -x c, until a step is below ESTIMATE (quadratic
 * convergence: the error is then of order 1e-8, within a cell or two of canonicalGap, which ends it).
 * With two branches the tangent between them is unique (F above is monotone), so an answer with
 * x' left of the spinodal interval [s1, s2] and x'' right of it is the gap. Writes (u', u'') into
 * `tangentEstimate` and returns true, or false to fall back to the sweep.
 */
function tangentNewton(iso: Isotherm, u1: number, u2: number, s1: number, s2: number): boolean {
  for (let iter = 0; iter < 8; iter++) {
    if (!(u1 < s1 && u2 > s2)) return false;
    if (!(u1 > -U_LIMIT && u2 < U_LIMIT)) return false; // the full solve says why (DILUTE_LIMIT)
    tangentStep(iso, u1, u2, derEstimate1, derEstimate2);
    const du1 = stepOut[0], du2 = stepOut[1];
    if (!Number.isFinite(du1) || !Number.isFinite(du2)) return false;
    u1 += du1;
    u2 += du2;
    if (Math.abs(du1) <= ESTIMATE * Math.max(1, Math.abs(u1)) && Math.abs(du2) <= ESTIMATE * Math.max(1, Math.abs(u2))) {
      if (!(u1 < s1 && u2 > s2)) return false;
      tangentEstimate[0] = u1;
      tangentEstimate[1] = u2;
      return true;
    }
  }
  return false;
}
const tangentEstimate = new Float64Array(2);

/** The convex stretches of g around the unstable intervals bounded by `spinodal`, from low x. */
export function convexBranches(iso: Isotherm, spinodal: Point[]): Branch[] {
  const slopeAt = (p: Point) => iso.dg(p.x, p.y);
  const branches: Branch[] = [];
  let start: Point | undefined; // left end of the branch being built (undefined: the dilute A end)
  for (let i = 0; i < spinodal.length; i += 2) {
    const a = spinodal[i], b = spinodal[i + 1];
    // An unstable interval across which g' does not fall measurably still bounds two branches:
    // its gap is the near-critical one (see nearCritical), as small as the interval itself.
    branches.push(branch(start, a));
    start = b;
  }
  branches.push(branch(start, undefined));
  return branches;

  function branch(a: Point | undefined, b: Point | undefined): Branch {
    const ua = a ? a.u : -Infinity, ub = b ? b.u : Infinity;
    const guess = a && b ? 0.5 * (ua + ub) : a ? ua + 1 : b ? ub - 1 : 0;
    return { a: ua, b: ub, slopeLow: a ? slopeAt(a) : -Infinity, slopeHigh: b ? slopeAt(b) : Infinity, guess };
  }
}

/** mu_A at the point of branch `br` where g' = m (the height of the tangent of slope m at x = 0). */
function tangentHeight(iso: Isotherm, br: Branch, m: number): { h: number; x: number } {
  try {
    const p = pointAt(solveSlope(iso, br, m));
    return { h: muA(iso, p.x, p.y), x: p.x };
  } catch (e) {
    // A trial slope whose point lies beyond U_LIMIT (closer than DILUTE_LIMIT to a pure component): there the tangent of
    // slope m touches g at the end itself, to every digit: x = 0, h = 0, or x = 1, h = g(1) - m = -m.
    // (The slope finally chosen is solved again, and fails properly if its point is out of range.)
    if (!(e instanceof MixgapError && e.reason === 'range')) throw e;
    return br.a === -Infinity ? { h: 0, x: 0 } : { h: -m, x: 1 };
  }
}

/**
 * The slope m > mFrom at which the envelope passes from branch j to branch k, if it does within
 * the slopes both branches can take (`sure`: it must). Safeguarded Newton on F(m) with
 * dF/dm = x_k - x_j, started at `m0` when given.
 */
function crossing(iso: Isotherm, j: Branch, k: Branch, mFrom: number, sure: boolean, m0?: number): number | undefined {
  let lo = Math.max(j.slopeLow, k.slopeLow, mFrom);
  let hi = Math.min(j.slopeHigh, k.slopeHigh);
  if (!(lo < hi)) return undefined;
  const F = (m: number) => {
    const pj = tangentHeight(iso, j, m), pk = tangentHeight(iso, k, m);
    return { F: pj.h - pk.h, dF: pk.x - pj.x };
  };
  let m = m0 !== undefined && m0 > lo && m0 < hi ? m0 : 0.5 * (lo + hi);
  if (!sure) {
    // Branch j stays below branch k over the whole overlap: no crossing. (A value below zero
    // within the rounding of F, where both points lie within 1e-13 of the same pure component and
    // F hardly rises, does not say so: the root search below decides.)
    if (F(hi).F < -SLOPE_STEP * (iso.RT + Math.abs(lo) + Math.abs(hi))) return undefined;
    const atLo = F(lo);
    if (atLo.F >= 0) return lo;
    if (m0 === undefined) {
      m = lo - atLo.F / atLo.dF;
      if (!(m > lo && m < hi)) m = 0.5 * (lo + hi);
    }
  }
  const lo0 = lo, hi0 = hi;
  const scale = iso.RT + Math.abs(lo) + Math.abs(hi);
  for (let iter = 0; iter < 200; iter++) {
    const { F: f, dF } = F(m);
    if (f === 0) return m;
    if (f < 0) lo = m; else hi = m;
    let next = m - f / dF;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - m) <= SLOPE_STEP * scale || hi - lo <= BRACKET_WIDTH * scale) {
      // Pinned against an end of the overlap: there was no sign change, so no tangent.
      if (next - lo0 <= 1e-9 * (hi0 - lo0) || hi0 - next <= 1e-9 * (hi0 - lo0)) {
        return fail('convergence', msg`no common tangent between the convex stretches at T = ${kelvin(iso.T)}`);
      }
      return next;
    }
    m = next;
  }
  return fail('convergence', msg`the common tangent did not converge at T = ${kelvin(iso.T)}`);
}

/** Scratch for x and y in solveSlope's loop. */
const xy = new Float64Array(2);


/**
 * The u on branch `br` where g'(u) = m: g' is increasing there (d g'/du = x y g'' >= 0).
 * Safeguarded Newton in u, with the bracket widened towards a dilute end when the branch is open.
 */
export function solveSlope(iso: Isotherm, br: Branch, m: number): number {
  if (m >= br.slopeHigh) return br.b;
  if (m <= br.slopeLow) return br.a;
  const tooDilute = () => fail('range', msg`a tangent point (gap boundary) lies closer than ${DILUTE_LIMIT} to a pure component at T = ${kelvin(iso.T)}: the interaction is very strong for this temperature; ${ENERGY_UNIT_HINT}`);
  let lo = br.a, hi = br.b;
  let u = Math.min(Math.max(br.guess, lo), hi);
  if (!Number.isFinite(u)) u = 0;
  for (let iter = 0; iter < 300; iter++) {
    splitRatio(u, xy);
    const x = xy[0], y = xy[1];
    iso.derivatives(x, y, derSolve);
    const f = derSolve[1] - m;
    if (f === 0) { br.guess = u; return u; }
    if (f < 0) lo = u; else hi = u;
    const step = f / (x * y * derSolve[2]);
    // Newton converges quadratically here: after a step below NEWTON_STEP (1e-12) the error is below 1e-20.
    // (Tested on the raw step: one that lands within an ulp of the root may touch the bracket.)
    if (Math.abs(step) <= NEWTON_STEP * Math.max(1, Math.abs(u))) {
      const root = Math.min(Math.max(u - step, lo), hi);
      if (Math.abs(root) >= U_LIMIT) tooDilute();
      br.guess = root;
      return root;
    }
    let next = u - step;
    // Towards an open (dilute) end, at most triple the distance from the branch's closed end:
    // a step from near a spinodal point (g'' ~ 0) could otherwise shoot far past the root.
    const wider = lo === -Infinity ? br.b - 3 * Math.max(1, br.b - u) : br.a + 3 * Math.max(1, u - br.a);
    if (lo === -Infinity) next = Math.max(next, wider);
    if (hi === Infinity) next = Math.min(next, wider);
    // Outside the bracket (or not a number, at a spinodal point where g'' = 0): bisect, or widen
    // towards the open end.
    if (!(next > lo && next < hi)) next = lo === -Infinity || hi === Infinity ? wider : 0.5 * (lo + hi);
    if (next < -U_LIMIT || next > U_LIMIT) {
      if (Math.abs(u) === U_LIMIT) tooDilute();
      next = next < 0 ? -U_LIMIT : U_LIMIT;
    }
    if (hi - lo <= BRACKET_WIDTH * Math.max(1, Math.abs(u))) {
      if (Math.abs(next) >= U_LIMIT) tooDilute();
      br.guess = next;
      return next;
    }
    u = next;
  }
  return fail('convergence', msg`a point of equal slope did not converge at T = ${kelvin(iso.T)}`);
}

/**
 * The phase map at a temperature next to `prev`, when the caller knows that no crossing lies
 * between the two temperatures (criticalSearch: so no unstable interval appears or vanishes, and
 * no gap opens or closes; a stable island opening inside the unstable interval, where no gap
 * closes, is found here: stableIslandBetween): the
 * spinodal points are followed by Newton's method on q and the gap by the first solve of
 * canonicalGap from its estimate, and each then ends in the same final solve as phaseMap's
 * (spinodalRootNear, canonicalGap), so the answer is phaseMap's, bit for bit, whatever `prev` was.
 * Covers the common cases of no gap and of one gap over one unstable interval; returns undefined
 * (the caller then solves from scratch) for anything else or when a step does not settle.
 * `before` and `beforeThat`, the maps of the two temperatures before `prev` (as a table gives
 * them), only start the solves closer: each point is extrapolated from the three temperatures, so
 * that one Newton step usually settles it, and none is taken when the extrapolation has settled
 * (see SETTLED). The work is followTrack's, on the maps' points.
 */
export function continueMap(iso: Isotherm, prev: PhaseMap, before?: PhaseMap, beforeThat?: PhaseMap): PhaseMap | undefined {
  if (prev.spinodal.length === 0 && prev.gaps.length === 0) return { T: iso.T, gaps: [], spinodal: [] };
  if (!followable(prev)) return undefined;
  const track = mapTrack;
  track.clear();
  const b = before && followable(before) ? before : undefined;
  const c = b && beforeThat && followable(beforeThat) ? beforeThat : undefined;
  if (c) track.addMap(c);
  if (b) track.addMap(b);
  track.addMap(prev);
  const followed = followTrack(iso, track);
  return followed && followedMap(iso, track, followed);
}

/**
 * The points of a followed map (one gap over one unstable interval: the spinodal points s1, s2 and
 * the gap's boundaries, in u) at up to three earlier temperatures, newest first, and followTrack's
 * answer at the next temperature: the same four points in `next`, with x and y = 1 - x of each (the
 * bits pointAt gives). continueMap fills one from maps; gapTable keeps one along a table, so that
 * its rows are followed without building maps.
 */
export class Track {
  readonly T = new Float64Array(3);
  /** The four points at T[0], then at T[1], then at T[2]. */
  readonly u = new Float64Array(12);
  length = 0;
  readonly next = new Float64Array(4);
  readonly x = new Float64Array(4);
  readonly y = new Float64Array(4);

  /** Adds the points at T as the newest (beyond three temperatures, the oldest is dropped). */
  add(T: number, s1: number, s2: number, low: number, high: number): void {
    const { u } = this;
    for (let k = 11; k >= 4; k--) u[k] = u[k - 4];
    u[0] = s1; u[1] = s2; u[2] = low; u[3] = high;
    this.T[2] = this.T[1]; this.T[1] = this.T[0]; this.T[0] = T;
    if (this.length < 3) this.length++;
  }

  /** Adds a followable map's points. */
  addMap(map: PhaseMap): void {
    this.add(map.T, map.spinodal[0].u, map.spinodal[1].u, map.gaps[0].low.u, map.gaps[0].high.u);
  }

  clear(): void {
    this.length = 0;
  }

  /** Point w of `next` as a Point (the bits pointAt(next[w]) gives). */
  nextPoint(w: number): Point {
    return { u: this.next[w], x: this.x[w], y: this.y[w] };
  }

  /** The newest points as a map (a start for phaseMap; the gap's slope is not kept: NaN, so phaseMap's sweep starts its slope search from the middle). */
  newest(): PhaseMap {
    const { u } = this;
    return { T: this.T[0], gaps: [{ low: pointAt(u[2]), high: pointAt(u[3]), slope: NaN }], spinodal: [pointAt(u[0]), pointAt(u[1])] };
  }
}
const mapTrack = new Track();

/** What followTrack found: one gap ('gap'), or one near a critical point ('near-critical': its spinodal points only). */
export type Followed = 'gap' | 'near-critical';

/**
 * continueMap's work on a track (at least one earlier temperature): the points at iso.T into
 * track.next (x and y of each beside them), each point ending in phaseMap's final solve. For
 * 'near-critical', next holds the spinodal points only (followedMap gives the gap).
 */
export function followTrack(iso: Isotherm, track: Track): Followed | undefined {
  extrapolate(iso.T, track);
  const e1 = settled[0] ? estimates[0] : followRoot(iso, estimates[0]);
  const e2 = settled[1] ? estimates[1] : followRoot(iso, estimates[1]);
  if (e1 === undefined || e2 === undefined) return undefined;
  const s1 = spinodalRootNear(iso, e1), s2 = spinodalRootNear(iso, e2);
  if (s1 === undefined || s2 === undefined || !(s1 < s2)) return undefined;
  // a stable island opening inside [s1, s2] (where no gap closes: not a critical point) splits it
  if (stableIslandBetween(iso, s1, s2)) return undefined;
  const { next, x, y } = track;
  next[0] = s1; next[1] = s2;
  splitRatio(s1, xyCell); x[0] = xyCell[0]; y[0] = xyCell[1];
  splitRatio(s2, xyCell); x[1] = xyCell[0]; y[1] = xyCell[1];
  // the two convex branches (as convexBranches gives them), in objects kept for this
  const j = lowBranch, k = highBranch;
  j.b = s1; j.guess = s1 - 1;
  k.a = s2; k.guess = s2 + 1;
  // g' at the spinodal points only where the near-critical test needs it (nothing else here reads it)
  j.slopeHigh = NaN; k.slopeLow = NaN;
  if (!farFromCritical(iso, s1, x[0], y[0], s2, x[1], y[1])) {
    j.slopeHigh = iso.dg(x[0], y[0]);
    k.slopeLow = iso.dg(x[1], y[1]);
    if (nearCritical(iso, j, k)) return 'near-critical';
  }
  // canonicalGap's first solve starts from the cells of the estimates, settled or not
  if (!canonicalTangent(iso, j, k, estimates[2], estimates[3])) return undefined;
  next[2] = tangentRoot[0]; next[3] = tangentRoot[1];
  splitRatio(next[2], xyCell); x[2] = xyCell[0]; y[2] = xyCell[1];
  splitRatio(next[3], xyCell); x[3] = xyCell[0]; y[3] = xyCell[1];
  return 'gap';
}

/** The map followTrack found (as continueMap returns it: the gap as canonicalGap or criticalGap gives it). */
export function followedMap(iso: Isotherm, track: Track, followed: Followed): PhaseMap {
  const spinodal = [track.nextPoint(0), track.nextPoint(1)];
  if (followed === 'near-critical') return { T: iso.T, gaps: [criticalGap(iso, track.next[0], track.next[1])], spinodal };
  const low = track.nextPoint(2);
  return { T: iso.T, gaps: [{ low, high: track.nextPoint(3), slope: iso.dg(low.x, low.y) }], spinodal };
}

/**
 * Whether g' falls across the unstable interval [s1, s2] by so much more than NEAR_CRITICAL_DROP RT
 * that nearCritical is false for certain: the drop from dgRatio (no logarithms) above the threshold
 * by 2^-30 of RT (4 + |s1| + |s2|) plus the sizes of g' and of its excess part at both points,
 * far above the rounding of either way of computing it for any model of sensible size (excess
 * terms that cancel to within 2^-21 of these would need energies near 1e10 J/mol). When this does
 * not settle it, the slopes are computed as convexBranches computes them and nearCritical decides,
 * as in phaseMap.
 */
function farFromCritical(iso: Isotherm, s1: number, x1: number, y1: number, s2: number, x2: number, y2: number): boolean {
  const RT = iso.RT;
  const d1 = iso.dgRatio(s1, x1, y1), d2 = iso.dgRatio(s2, x2, y2);
  const size = RT * (4 + Math.abs(s1) + Math.abs(s2)) + Math.abs(d1) + Math.abs(d2) + Math.abs(d1 - RT * s1) + Math.abs(d2 - RT * s2);
  return d1 - d2 > NEAR_CRITICAL_DROP * RT + 2 ** -30 * size;
}
const lowBranch: Branch = { a: -Infinity, b: 0, slopeLow: -Infinity, slopeHigh: 0, guess: 0 };
const highBranch: Branch = { a: 0, b: Infinity, slopeLow: 0, slopeHigh: Infinity, guess: 0 };

/** One gap over one unstable interval: what continueMap follows. */
export function followable(map: PhaseMap): boolean {
  return map.spinodal.length === 2 && map.gaps.length === 1;
}

/**
 * The points a row follows (0, 1: the spinodal points; 2, 3: the gap's boundaries) in u, at the
 * temperature of the row (see extrapolate), and whether each has settled (see SETTLED).
 */
const estimates = new Float64Array(4);
const settled = [false, false, false, false];

/**
 * Each point at T (into `estimates`), extrapolated from the track's points at up to three earlier
 * temperatures: Lagrange's polynomial through them (the weights of u0, u1, u2, the points at T[0],
 * T[1], T[2], are the same for every point of a row), settled when its second-order part
 * (quadratic minus linear extrapolation, u0 + (u0 - u1) (T - t0) / (t0 - t1)) is below SETTLED.
 * Only a starting point: anything not finite or far from the last answer gives way to the last
 * answer.
 */
function extrapolate(T: number, track: Track): void {
  const known = track.u, n = track.length;
  if (n < 2) {
    for (let w = 0; w < 4; w++) { estimates[w] = known[w]; settled[w] = false; }
    return;
  }
  const t0 = track.T[0], t1 = track.T[1];
  const wLinear = (T - t0) / (t0 - t1);
  let w0 = 0, w1 = 0, w2 = 0;
  if (n > 2) {
    const t2 = track.T[2];
    w0 = ((T - t1) * (T - t2)) / ((t0 - t1) * (t0 - t2));
    w1 = ((T - t0) * (T - t2)) / ((t1 - t0) * (t1 - t2));
    w2 = ((T - t0) * (T - t1)) / ((t2 - t0) * (t2 - t1));
  }
  for (let w = 0; w < 4; w++) {
    const u0 = known[w], u1 = known[4 + w];
    const linear = u0 + (u0 - u1) * wLinear;
    let u = linear, done = false;
    if (n > 2) {
      u = u0 * w0 + u1 * w1 + known[8 + w] * w2;
      done = Math.abs(u - linear) <= SETTLED * Math.max(1, Math.abs(u));
    }
    const near = Number.isFinite(u) && Math.abs(u - u0) < 0.25;
    estimates[w] = near ? u : u0;
    settled[w] = near && done;
  }
}

/** g'' and g''' at followRoot's point. */
const curvFollow = new Float64Array(2);

/** An estimate of the root of q = x y g''/RT near u, by Newton's method (undefined if it does not settle nearby). */
function followRoot(iso: Isotherm, u: number): number | undefined {
  const start = u;
  for (let iter = 0; iter < 12; iter++) {
    splitRatio(u, xyCell);
    const x = xyCell[0], y = xyCell[1];
    iso.curvatures(x, y, curvFollow);
    const d2 = curvFollow[0];
    // q / (dq/du) = g'' / ((y - x) g'' + x y g''')
    const step = d2 / ((y - x) * d2 + x * y * curvFollow[1]);
    if (!Number.isFinite(step)) return undefined;
    u -= step;
    if (Math.abs(u - start) > 0.5) return undefined;
    if (Math.abs(step) <= ESTIMATE * Math.max(1, Math.abs(u))) return u; // an estimate: error now of order 1e-8
  }
  return undefined;
}
