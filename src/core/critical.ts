import { phaseMap } from './binodal';
import { ENERGY_UNIT_HINT, ENERGY_UNIT_HINT_SMALL, T_SEARCH_MAX, T_SEARCH_MIN } from './limits';
import { curvature, curvatureMap, refineExtremum } from './curvature';
import { fail, kelvin, MixgapError, msg } from './errors';
import type { BinaryModel, Isotherm, Point } from './model';
import { pointAt } from './model';
import { brentMin, brentRoot } from './roots';

/** A critical (consolute) point: g'' = g''' = 0 where a gap closes. */
export interface CriticalPoint {
  T: number;
  x: number;
  /** 'upper': the gap exists just below T; 'lower': just above. */
  kind: 'upper' | 'lower';
}

/** Temperatures sampled between T_SEARCH_MIN and T_SEARCH_MAX, evenly in ln T (steps of 3.4 %). */
const SAMPLES = 300;
/** Relative tolerance in T of a critical temperature (Brent's method on the depth of a minimum). */
const T_TOLERANCE = 1e-13;
/** A followed minimum whose scaled depth |q| / scale stays below this at a sampled extremum in T may dip through zero between samples. */
const DIP_DEPTH = 0.2;
/** Relative tolerance in T of the extremum of such a dip (it only needs to split the interval). */
const DIP_TOLERANCE = 1e-9;
/** Bisections on T where the number of unstable intervals changes: down to FOLD_WIDTH T, at most FOLD_STEPS of them. */
const FOLD_STEPS = 80;
const FOLD_WIDTH = 1e-12;
/** Two points closer than these (relative in T, absolute in x) are one. */
const SAME_T = 1e-9;
const SAME_X = 1e-6;
/** Without a pairing by order, a minimum is followed to the nearest one within FOLLOW_REACH (1 + |u|/4) in u: near a dilute end u moves fast. */
const FOLLOW_REACH = (u: number) => 1 + 0.25 * Math.abs(u);
/** A minimum is searched from +-MINIMUM_HALF_WIDTH in u around where it was, widened up to MINIMUM_WIDENINGS times, to MINIMUM_TOLERANCE in u. */
const MINIMUM_HALF_WIDTH = 0.5;
const MINIMUM_WIDENINGS = 10;
const MINIMUM_TOLERANCE = 1e-14;
/** closesThere looks at the gap CLOSE_STEP Tc and a quarter of that from Tc: close enough for the leading order, far enough for the rounding of the widths. */
const CLOSE_STEP = 1e-4;
/** A gap that closes like sqrt(|T - Tc|) has width ratio 1/2 between a quarter and the whole step; these bounds leave room for the next order. */
const CLOSE_RATIO_MIN = 0.3;
const CLOSE_RATIO_MAX = 0.7;

/** A local minimum of q = x y g''/RT (relative to its end values) followed over temperature. */
interface Track {
  u: number;
  q: number;
}

/** A candidate critical point: where a followed minimum of q crosses zero. */
interface Candidate {
  T: number;
  u: number;
  kind: 'upper' | 'lower';
}

/**
 * Every critical point between T_SEARCH_MIN and T_SEARCH_MAX, highest temperature first.
 *
 * At a critical point a local minimum of the scaled curvature q(u) = x y g''/RT passes through
 * zero (then g'' = 0 and dq/du = 0, i.e. g''' = 0). In named steps:
 *   1. sampleMinima: the local minima of q at temperatures sampled evenly in ln T;
 *   2. signChanges: where a followed minimum changes sign between two samples, the temperature at
 *      which it is zero, by Brent's method (minimising q near the followed position at each trial T);
 *   3. dips: a minimum that dips below zero and comes back between samples (a small closed loop),
 *      caught by minimising its depth over T where the sampled depths have an extremum near zero;
 *   4. folds: a minimum that appears (in a fold, with q > 0) and crosses zero between two samples,
 *      where the number of unstable intervals changes and steps 2-3 found nothing;
 *   5. confirm: a point is kept only if the gap really closes there (its width shrinks towards it
 *      like a square root), which excludes metastable points inside a wider stable gap.
 */
export function criticalPoints(model: BinaryModel, Tmin = T_SEARCH_MIN, Tmax = T_SEARCH_MAX): CriticalPoint[] {
  return criticalSearch(model, Tmin, Tmax).points;
}

/**
 * criticalPoints, and `crossings`: the temperature of every candidate of steps 2-4, confirmed or
 * not (sorted), i.e. everywhere a minimum of q was found to cross zero, where an unstable interval
 * appears or vanishes: also inside a wider gap (a metastable critical point), where no gap closes.
 * A table followed from row to row (gapTable) must not follow across any of them.
 */
export function criticalSearch(model: BinaryModel, Tmin = T_SEARCH_MIN, Tmax = T_SEARCH_MAX): { points: CriticalPoint[]; crossings: number[] } {
  const Ts: number[] = [];
  for (let i = 0; i < SAMPLES; i++) Ts.push(Tmin * Math.pow(Tmax / Tmin, i / (SAMPLES - 1)));
  const { minimaAt, intervals } = sampleMinima(model, Ts);
  const found: Candidate[] = [];
  signChangesAndDips(model, Ts, minimaAt, found);
  folds(model, Ts, intervals, found);
  return { points: confirm(model, found), crossings: found.map((f) => f.T).sort((a, b) => a - b) };
}

/** Step 1: the local minima of q at each sampled temperature (scaled by q's end values), and the number of unstable intervals (-1 where g'' cannot be followed: parameters far too large there). */
function sampleMinima(model: BinaryModel, Ts: number[]): { minimaAt: Track[][]; intervals: number[] } {
  const intervals: number[] = [];
  const minimaAt = Ts.map((T) => {
    try {
      const map = curvatureMap(model.at(T), true);
      intervals.push(map.spinodal.length / 2);
      return map.minima.map((m) => ({ u: m.point.u, q: m.q / map.scale }));
    } catch {
      intervals.push(-1);
      return [];
    }
  });
  return { minimaAt, intervals };
}

/** The depth q of the local minimum of q nearest to u at T. */
function depth(model: BinaryModel, T: number, u: number): { u: number; q: number } {
  return localMinimum(model.at(T), u);
}

/**
 * Step 2's root: the temperature between Ta and Tb at which the minimum followed from u is zero,
 * added to `found` (nothing if it does not change sign there: it went elsewhere between samples).
 */
function rootBetween(model: BinaryModel, Ta: number, Tb: number, u: number, found: Candidate[]): void {
  let uNow = u;
  const f = (T: number) => {
    const m = depth(model, T, uNow);
    uNow = m.u;
    return m.q;
  };
  const fa = f(Ta), fb = f(Tb);
  if (fa < 0 === fb < 0) return;
  uNow = u;
  const T = brentRoot(f, Ta, Tb, fa, fb, T_TOLERANCE * Tb);
  if (Number.isNaN(T)) return;
  const m = depth(model, T, uNow);
  found.push({ T, u: m.u, kind: fa < 0 ? 'upper' : 'lower' });
}

/** Steps 2 and 3: sign changes of each followed minimum between samples, and dips through zero between them. */
function signChangesAndDips(model: BinaryModel, Ts: number[], minimaAt: Track[][], found: Candidate[]): void {
  for (let i = 0; i + 1 < Ts.length; i++) {
    for (const [index, a] of minimaAt[i].entries()) {
      const b = follow(minimaAt[i], minimaAt[i + 1], index);
      if (!b) continue;
      if (a.q < 0 !== b.q < 0) rootBetween(model, Ts[i], Ts[i + 1], a.u, found);
      // a dip (or a bump) between samples: depth near zero with a local extremum in T
      const c = i + 2 < Ts.length ? follow(minimaAt[i + 1], minimaAt[i + 2], minimaAt[i + 1].indexOf(b)) : undefined;
      if (!(c && b.q < 0 === a.q < 0 && b.q < 0 === c.q < 0 && Math.abs(b.q) < DIP_DEPTH)) continue;
      const sign = b.q > 0 ? 1 : -1;
      if (!(sign * (a.q - b.q) > 0 && sign * (c.q - b.q) > 0)) continue;
      let uNow = b.u;
      const extreme = brentMin((T) => {
        const m = depth(model, T, uNow);
        uNow = m.u;
        return sign * m.q;
      }, Ts[i], Ts[i + 2], DIP_TOLERANCE * Ts[i + 2]);
      if (sign * extreme.f < 0 !== b.q < 0) {
        rootBetween(model, Ts[i], extreme.t, a.u, found);
        rootBetween(model, extreme.t, Ts[i + 2], uNow, found);
      }
    }
  }
}

/**
 * Step 4: a minimum can appear (in a fold, with q > 0) and cross zero between two samples, where no
 * minimum was there to follow. Wherever the number of unstable intervals changes between two
 * samples and no critical point was found, bisect on T down to FOLD_WIDTH and look at the interval
 * that appears: if q > 0 at its middle on the other side, a minimum crossed zero there.
 */
function folds(model: BinaryModel, Ts: number[], intervals: number[], found: Candidate[]): void {
  // Unstable intervals at T (undefined where g'' cannot be followed).
  const spinodalAt = (T: number): Point[] | undefined => {
    try {
      return curvatureMap(model.at(T), false).spinodal;
    } catch {
      return undefined;
    }
  };
  for (let i = 0; i + 1 < Ts.length; i++) {
    if (intervals[i] < 0 || intervals[i + 1] < 0 || intervals[i] === intervals[i + 1]) continue;
    if (found.some((f) => f.T >= Ts[i] && f.T <= Ts[i + 1])) continue;
    let lo = Ts[i], hi = Ts[i + 1];
    let sLo = spinodalAt(lo), sHi = spinodalAt(hi);
    for (let k = 0; k < FOLD_STEPS && sLo && sHi && hi - lo > FOLD_WIDTH * hi; k++) {
      const mid = 0.5 * (lo + hi);
      const sMid = spinodalAt(mid);
      if (!sMid) break;
      if (sMid.length === sLo.length) { lo = mid; sLo = sMid; } else { hi = mid; sHi = sMid; }
    }
    if (!sLo || !sHi || sLo.length === sHi.length) continue;
    const [more, lessT] = sLo.length > sHi.length ? [sLo, hi] : [sHi, lo];
    const other = model.at(lessT);
    for (let j = 0; j < more.length; j += 2) {
      const u = 0.5 * (more[j].u + more[j + 1].u);
      if (curvature(other, pointAt(u)) > 0) rootBetween(model, lo, hi, u, found);
    }
  }
}

/** Step 5: candidates once each (SAME_T, SAME_X), kept where the gap really closes; highest temperature first, points at the same temperature (symmetric domes) from low x. */
function confirm(model: BinaryModel, found: Candidate[]): CriticalPoint[] {
  const points: CriticalPoint[] = [];
  for (const f of found) {
    if (points.some((p) => Math.abs(p.T - f.T) < SAME_T * f.T && Math.abs(pointAt(f.u).x - p.x) < SAME_X)) continue;
    if (closesThere(model, f.T, f.u, f.kind)) points.push({ T: f.T, x: pointAt(f.u).x, kind: f.kind });
  }
  return points.sort((p, q) => (Math.abs(p.T - q.T) <= SAME_T * p.T ? p.x - q.x : q.T - p.T));
}

/**
 * The minimum at the next sampled temperature that minimum `index` became. Local minima of q do
 * not cross one another, so with as many minima at both temperatures they pair in order of u,
 * however far they moved (near a dilute end u moves fast). Otherwise the nearest one, if within
 * FOLLOW_REACH in u.
 */
function follow(from: Track[], to: Track[], index: number): Track | undefined {
  if (from.length === to.length) return to[index];
  const u = from[index].u;
  let best: Track | undefined;
  for (const m of to) if (Math.abs(m.u - u) < FOLLOW_REACH(u) && (!best || Math.abs(m.u - u) < Math.abs(best.u - u))) best = m;
  return best;
}

/** The local minimum of q nearest to u (searched from +-MINIMUM_HALF_WIDTH in u outwards: it may have moved far). */
function localMinimum(iso: Isotherm, u: number): { u: number; q: number } {
  return refineExtremum(iso, u - MINIMUM_HALF_WIDTH, u + MINIMUM_HALF_WIDTH, 1, MINIMUM_WIDENINGS, MINIMUM_TOLERANCE);
}

/**
 * Whether a gap really closes at (Tc, xc): on the side where it exists, a gap must contain xc
 * and narrow like sqrt(|T - Tc|) towards it (width ratio 1/2 for a quarter of the distance), and
 * on the other side no gap may contain xc.
 */
function closesThere(model: BinaryModel, Tc: number, u: number, kind: 'upper' | 'lower'): boolean {
  const xc = pointAt(u).x;
  const width = (dT: number) => {
    const T = kind === 'upper' ? Tc - dT : Tc + dT;
    if (!(T > 0)) return NaN;
    try {
      const gap = phaseMap(model.at(T)).gaps.find((g) => g.low.x < xc && xc < g.high.x);
      return gap ? gap.high.x - gap.low.x : NaN;
    } catch {
      return NaN;
    }
  };
  const dT = CLOSE_STEP * Tc;
  const wide = width(dT), narrow = width(dT / 4);
  if (!(wide > 0 && narrow > 0)) return false;
  // and on the other side the gap must be gone (no gap around xc)
  if (width(-dT) > 0) return false;
  const ratio = narrow / wide;
  return ratio > CLOSE_RATIO_MIN && ratio < CLOSE_RATIO_MAX;
}

/** Temperatures at which `noCriticalPoint` looks whether the system is split: evenly in ln T. */
const SPLIT_SAMPLES = 41;


/**
 * Why a system has no critical point in the search range, as a 'none' failure: it is split into
 * two phases at every temperature searched, homogeneous at every one, or neither (its gaps reach
 * the ends of the range without closing). A temperature counts as split when g'' < 0 somewhere
 * (a gap without an unstable interval exists only at a critical point) or when the solution is
 * unstable even at the dilute limit.
 */
export function noCriticalPoint(model: BinaryModel): never {
  let split = 0;
  for (let i = 0; i < SPLIT_SAMPLES; i++) {
    const T = T_SEARCH_MIN * Math.pow(T_SEARCH_MAX / T_SEARCH_MIN, i / (SPLIT_SAMPLES - 1));
    try {
      if (curvatureMap(model.at(T), false).spinodal.length > 0) split++;
    } catch (e) {
      if (!(e instanceof MixgapError && e.reason === 'range')) throw e;
      split++;
    }
  }
  if (split === SPLIT_SAMPLES) {
    return fail('none', msg`this system has no critical point: it is split into two phases at every temperature searched (${kelvin(T_SEARCH_MIN)} to ${kelvin(T_SEARCH_MAX)}); ${ENERGY_UNIT_HINT}`);
  }
  if (split === 0) {
    return fail('none', msg`this system has no critical point: it is one phase at every temperature searched (${kelvin(T_SEARCH_MIN)} to ${kelvin(T_SEARCH_MAX)}), no gap opens; ${ENERGY_UNIT_HINT_SMALL}`);
  }
  return fail('none', msg`this system has no critical point between ${kelvin(T_SEARCH_MIN)} and ${kelvin(T_SEARCH_MAX)}: its gaps reach the ends of that range without closing`);
}

/** The critical point numbered n (1 = highest temperature). */
export function criticalPoint(points: CriticalPoint[], n: number): CriticalPoint {
  if (points.length === 0) fail('none', msg`this system has no critical point between ${kelvin(T_SEARCH_MIN)} and ${kelvin(T_SEARCH_MAX)}`);
  if (!(n >= 1 && n <= points.length && Number.isInteger(n))) {
    fail('range', `critical point ${n} does not exist: this system has ${points.length} (numbered 1 to ${points.length}, highest temperature first)`);
  }
  return points[n - 1];
}
