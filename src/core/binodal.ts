import { curvatureMap, spinodalRootNear } from './curvature';
import { fail, kelvin, MixgapError, msg } from './errors';
import type { Isotherm, Point } from './model';
import { logRatio, muA, pointAt, splitRatio } from './model';
import { BRACKET_WIDTH, CELL, DILUTE_LIMIT, ENERGY_UNIT_HINT, ESTIMATE, SETTLED, NEAR_CRITICAL_DROP, NEWTON_STEP, SLOPE_STEP, U_LIMIT } from './limits';
import type { SignCell } from './roots';

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

const innerSlope = new Float64Array(1), outerSlope = new Float64Array(1);
const xyCell = new Float64Array(2);

// State of the final solves below, at module level so that their inner loops allocate nothing.
let solveIso: Isotherm;
let partnerBranch: Branch;
// Their numbers (the slope m of the current solve, the partner's last point, the slope m of the
// last partner solve and d g'/du near its point, NaN: none yet, to step the next estimate to its
// cell) live in a typed array: a module-level `let` holding a double allocates on every write.
const state = new Float64Array(4);
const SOLVE_M = 0, PARTNER_ESTIMATE = 1, PARTNER_M = 2, PARTNER_RATE = 3;
const innerCell: SignCell = { a: 0, b: 0, fa: 0, fb: 0 }, outerCell: SignCell = { a: 0, b: 0, fa: 0, fb: 0 };

/** Scratch for g, g', g'' (Isotherm.derivatives), one per caller so that none overwrites another's. */
const derSlope = new Float64Array(3), derTangent = new Float64Array(3), derEstimate1 = new Float64Array(3), derEstimate2 = new Float64Array(3), derSolve = new Float64Array(3);

/**
 * g' at the last MEMO cell ends asked for, for one isotherm: the partner solves of one canonicalGap
 * ask for the same or neighbouring sign cells with slightly different slopes m (g' is a pure
 * function of u: the same bits).
 */
const MEMO = 4;
let memoIso: Isotherm | undefined;
const memoU = new Float64Array(MEMO).fill(NaN), memoD = new Float64Array(MEMO);
let memoNext = 0;

/** g'(u) - m. */
function slopeGap(u: number): number {
  const iso = solveIso;
  if (iso === memoIso) {
    for (let i = 0; i < MEMO; i++) if (memoU[i] === u) return memoD[i] - state[SOLVE_M];
  } else {
    memoIso = iso;
    memoU.fill(NaN);
  }
  splitRatio(u, xyCell);
  const d = iso.dg(xyCell[0], xyCell[1]);
  memoU[memoNext] = u;
  memoD[memoNext] = d;
  memoNext = (memoNext + 1) % MEMO;
  return d - state[SOLVE_M];
}

/** g'(u) - m and its slope d g'/du = x y g''. */
function slopeGapNewton(u: number, out: Float64Array): number {
  splitRatio(u, xyCell);
  const x = xyCell[0], y = xyCell[1];
  solveIso.derivatives(x, y, derSlope);
  out[0] = x * y * derSlope[2];
  return derSlope[1] - state[SOLVE_M];
}

/** signCell (roots.ts) of slopeGap, its own copy of the rule (see there). */
function signCellSlope(estimate: number, out: SignCell): SignCell | undefined {
  let i = Math.floor(estimate / CELL);
  let fa = slopeGap(i * CELL), fb = slopeGap((i + 1) * CELL);
  for (let walk = 0; walk < 16; walk++) {
    if (fa < 0 && fb >= 0) {
      out.a = i * CELL; out.b = (i + 1) * CELL; out.fa = fa; out.fb = fb;
      return out;
    }
    if (!(fa === fa && fb === fb) || (fa >= 0 && fb < 0)) return undefined;
    if (fa >= 0) { i--; fb = fa; fa = slopeGap(i * CELL); } else { i++; fa = fb; fb = slopeGap((i + 1) * CELL); }
  }
  return undefined;
}

/** cellNewton (roots.ts) of slopeGapNewton, its own copy of the rule (see there). */
function cellNewtonSlope(cell: SignCell, out: Float64Array): number | undefined {
  let lo = cell.a, hi = cell.b;
  let t = cell.a - (cell.fa * (cell.b - cell.a)) / (cell.fb - cell.fa);
  if (!(t > lo && t < hi)) t = 0.5 * (lo + hi);
  for (let iter = 0; iter < 60; iter++) {
    const f = slopeGapNewton(t, out);
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
 * The point of branch `br` where g' = m, the same bits from any estimate within a few cells of it:
 * Newton in its sign cell (roots.ts). Undefined if that cell is not found or leaves the branch.
 */
function canonicalSlopePoint(iso: Isotherm, br: Branch, m: number, estimate: number): number | undefined {
  solveIso = iso;
  state[SOLVE_M] = m;
  const cell = signCellSlope(estimate, innerCell);
  if (!cell || !(cell.a > br.a && cell.b < br.b)) return undefined;
  return cellNewtonSlope(cell, innerSlope);
}

/**
 * G(u1) = mu_A(u1) - mu_A(u2) with u2 on the partner branch where g'(u2) = g'(u1), and (with `out`)
 * dG/du1 = c1 (x2 - x1); NaN where u2 cannot be found.
 */
function tangentGap(u: number, out?: Float64Array): number {
  const iso = solveIso;
  splitRatio(u, xyCell);
  const x1 = xyCell[0], y1 = xyCell[1];
  iso.derivatives(x1, y1, derTangent);
  const m = derTangent[1];
  const mu1 = derTangent[0] - x1 * m;
  const c1 = x1 * y1 * derTangent[2];
  // The next partner point is near the last one, moved by (m - m_last) / (d g'/du): one Newton step
  // (the answer does not depend on the estimate, only the walk to its cell does).
  const step = (m - state[PARTNER_M]) / state[PARTNER_RATE];
  const v = canonicalSlopePoint(iso, partnerBranch, m, Number.isFinite(step) ? state[PARTNER_ESTIMATE] + step : state[PARTNER_ESTIMATE]);
  if (v === undefined) return NaN;
  state[PARTNER_ESTIMATE] = v;
  state[PARTNER_M] = m;
  state[PARTNER_RATE] = innerSlope[0];
  splitRatio(v, xyCell);
  const x2 = xyCell[0], y2 = xyCell[1];
  if (out) out[0] = c1 * (x2 - x1);
  return mu1 - (iso.g(x2, y2) - x2 * m);
}

/** signCell (roots.ts) of tangentGap, its own copy of the rule (see there). */
function signCellTangent(estimate: number, out: SignCell): SignCell | undefined {
  let i = Math.floor(estimate / CELL);
  let fa = tangentGap(i * CELL), fb = tangentGap((i + 1) * CELL);
  for (let walk = 0; walk < 16; walk++) {
    if (fa < 0 && fb >= 0) {
      out.a = i * CELL; out.b = (i + 1) * CELL; out.fa = fa; out.fb = fb;
      return out;
    }
    if (!(fa === fa && fb === fb) || (fa >= 0 && fb < 0)) return undefined;
    if (fa >= 0) { i--; fb = fa; fa = tangentGap(i * CELL); } else { i++; fa = fb; fb = tangentGap((i + 1) * CELL); }
  }
  return undefined;
}

/** cellNewton (roots.ts) of tangentGap, its own copy of the rule (see there). */
function cellNewtonTangent(cell: SignCell, out: Float64Array): number | undefined {
  let lo = cell.a, hi = cell.b;
  let t = cell.a - (cell.fa * (cell.b - cell.a)) / (cell.fb - cell.fa);
  if (!(t > lo && t < hi)) t = 0.5 * (lo + hi);
  for (let iter = 0; iter < 60; iter++) {
    const f = tangentGap(t, out);
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
 * The gap between branches j and k, the same bits from any estimate (u1, u2) close to it: what a
 * warm start or the sweep found only chooses where the work starts. In u1 on branch j, with u2 on
 * branch k where g'(u2) = g'(u1) (canonicalSlopePoint), the common tangent is the root of
 *   G(u1) = mu_A(u1) - mu_A(u2),  dG/du1 = c1 (x2 - x1) > 0  (c = x y g''),
 * solved by Newton in its sign cell (roots.ts). Undefined when a cell is not found (the caller
 * keeps its own answer or solves again from scratch), or near U_LIMIT (its own solve says why).
 */
export function canonicalGap(iso: Isotherm, j: Branch, k: Branch, u1: number, u2: number): Gap | undefined {
  if (!(Math.abs(u1) < U_LIMIT - 1 && Math.abs(u2) < U_LIMIT - 1)) return undefined;
  solveIso = iso;
  partnerBranch = k;
  state[PARTNER_ESTIMATE] = u2;
  state[PARTNER_RATE] = NaN;
  const cell = signCellTangent(u1, outerCell);
  if (!cell || !(cell.a > j.a && cell.b < j.b)) return undefined;
  const root = cellNewtonTangent(cell, outerSlope);
  if (root === undefined) return undefined;
  const low = pointAt(root);
  const slope = iso.dg(low.x, low.y);
  const step = (slope - state[PARTNER_M]) / state[PARTNER_RATE];
  const v = canonicalSlopePoint(iso, k, slope, Number.isFinite(step) ? state[PARTNER_ESTIMATE] + step : u2);
  if (v === undefined) return undefined;
  return { low, high: pointAt(v), slope };
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
    splitRatio(u1, xyCell);
    const x1 = xyCell[0], y1 = xyCell[1];
    splitRatio(u2, xyCell);
    const x2 = xyCell[0], y2 = xyCell[1];
    iso.derivatives(x1, y1, derEstimate1);
    iso.derivatives(x2, y2, derEstimate2);
    const d1 = derEstimate1[1], d2 = derEstimate2[1];
    const G1 = d1 - d2;
    const G2 = derEstimate1[0] - x1 * d1 - (derEstimate2[0] - x2 * d2);
    const c1 = x1 * y1 * derEstimate1[2], c2 = x2 * y2 * derEstimate2[2];
    // c1 du1 - c2 du2 = -G1;  -x1 c1 du1 + x2 c2 du2 = -G2
    const b = -(G2 + x1 * G1) / (x2 - x1);
    const a = b - G1;
    const du1 = a / c1, du2 = b / c2;
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
 * The phase map at a temperature next to `prev`, when the caller knows that no critical point lies
 * between the two temperatures (so no gap opens or closes and no unstable interval appears): the
 * spinodal points are followed by Newton's method on q and the gap by `tangentNewton`, and each
 * then ends in the same final solve as phaseMap's (spinodalRootNear, canonicalGap), so the answer
 * is phaseMap's, bit for bit, whatever `prev` was. Covers the common cases of no gap and of one
 * gap over one unstable interval; returns undefined (the caller then solves from scratch) for
 * anything else or when a step does not settle. `before` and `beforeThat`, the maps of the two
 * temperatures before `prev` (as a table gives them), only start the solves closer: each point is
 * extrapolated from the three temperatures, so that one Newton step usually settles it, and none
 * is taken when the extrapolation has settled (see SETTLED).
 */
export function continueMap(iso: Isotherm, prev: PhaseMap, before?: PhaseMap, beforeThat?: PhaseMap): PhaseMap | undefined {
  if (prev.spinodal.length === 0 && prev.gaps.length === 0) return { T: iso.T, gaps: [], spinodal: [] };
  if (!followable(prev)) return undefined;
  const b = before && followable(before) ? before : undefined;
  const c = b && beforeThat && followable(beforeThat) ? beforeThat : undefined;
  let e1: number | undefined = ahead(iso.T, 0, prev, b, c);
  if (!aheadSettled) e1 = followRoot(iso, e1);
  let e2: number | undefined = ahead(iso.T, 1, prev, b, c);
  if (!aheadSettled) e2 = followRoot(iso, e2);
  if (e1 === undefined || e2 === undefined) return undefined;
  const s1 = spinodalRootNear(iso, e1), s2 = spinodalRootNear(iso, e2);
  if (s1 === undefined || s2 === undefined || !(s1 < s2)) return undefined;
  const spinodal = [pointAt(s1), pointAt(s2)];
  // the two convex branches (as convexBranches gives them), in objects kept for this
  const j = lowBranch, k = highBranch;
  j.b = s1; j.slopeHigh = iso.dg(spinodal[0].x, spinodal[0].y); j.guess = s1 - 1;
  k.a = s2; k.slopeLow = iso.dg(spinodal[1].x, spinodal[1].y); k.guess = s2 + 1;
  if (nearCritical(iso, j, k)) return { T: iso.T, gaps: [criticalGap(iso, s1, s2)], spinodal };
  const g1 = ahead(iso.T, 2, prev, b, c), settled1 = aheadSettled, g2 = ahead(iso.T, 3, prev, b, c);
  const gap = settled1 && aheadSettled ? canonicalGap(iso, j, k, g1, g2)
    : tangentNewton(iso, g1, g2, s1, s2) ? canonicalGap(iso, j, k, tangentEstimate[0], tangentEstimate[1]) : undefined;
  return gap && { T: iso.T, gaps: [gap], spinodal };
}
const lowBranch: Branch = { a: -Infinity, b: 0, slopeLow: -Infinity, slopeHigh: 0, guess: 0 };
const highBranch: Branch = { a: 0, b: Infinity, slopeLow: 0, slopeHigh: Infinity, guess: 0 };

/** One gap over one unstable interval: what continueMap follows. */
function followable(map: PhaseMap): boolean {
  return map.spinodal.length === 2 && map.gaps.length === 1;
}

/** Point `which` (0, 1: the spinodal points; 2, 3: the gap's boundaries) of a followable map, in u. */
function pointOf(map: PhaseMap, which: number): number {
  return which < 2 ? map.spinodal[which].u : which === 2 ? map.gaps[0].low.u : map.gaps[0].high.u;
}

/** Whether the last `ahead` answer has settled (see SETTLED). */
let aheadSettled = false;

/**
 * Point `which` at T, extrapolated from the maps at up to three earlier temperatures (Lagrange's
 * polynomial through them): only a starting point, so anything not finite or far from the last
 * answer gives way to the last answer itself. Sets aheadSettled.
 */
function ahead(T: number, which: number, p: PhaseMap, b?: PhaseMap, c?: PhaseMap): number {
  aheadSettled = false;
  const u0 = pointOf(p, which);
  if (!b) return u0;
  const t0 = p.T, t1 = b.T, u1 = pointOf(b, which);
  const linear = u0 + ((u0 - u1) * (T - t0)) / (t0 - t1);
  let u = linear;
  if (c) {
    const t2 = c.T, u2 = pointOf(c, which);
    u = (u0 * (T - t1) * (T - t2)) / ((t0 - t1) * (t0 - t2))
      + (u1 * (T - t0) * (T - t2)) / ((t1 - t0) * (t1 - t2))
      + (u2 * (T - t0) * (T - t1)) / ((t2 - t0) * (t2 - t1));
    aheadSettled = Math.abs(u - linear) <= SETTLED * Math.max(1, Math.abs(u));
  }
  if (Number.isFinite(u) && Math.abs(u - u0) < 0.25) return u;
  aheadSettled = false;
  return u0;
}

/** An estimate of the root of q = x y g''/RT near u, by Newton's method (undefined if it does not settle nearby). */
function followRoot(iso: Isotherm, u: number): number | undefined {
  const start = u;
  for (let iter = 0; iter < 12; iter++) {
    splitRatio(u, xyCell);
    const x = xyCell[0], y = xyCell[1], d2 = iso.d2g(x, y);
    // q / (dq/du) = g'' / ((y - x) g'' + x y g''')
    const step = d2 / ((y - x) * d2 + x * y * iso.d3g(x, y));
    if (!Number.isFinite(step)) return undefined;
    u -= step;
    if (Math.abs(u - start) > 0.5) return undefined;
    if (Math.abs(step) <= ESTIMATE * Math.max(1, Math.abs(u))) return u; // an estimate: error now of order 1e-8
  }
  return undefined;
}
