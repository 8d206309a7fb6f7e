import { phaseMap } from './binodal';
import { T_SEARCH_MAX, T_SEARCH_MIN } from './limits';
import { curvature, curvatureMap, refineExtremum } from './curvature';
import { fail } from './errors';
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

/** Temperatures sampled between 1 K and 20000 K, evenly in ln T (steps of 3.4 %). */
const SAMPLES = 300;

/** A local minimum of q = x y g''/RT (relative to its end values) followed over temperature. */
interface Track {
  u: number;
  q: number;
}

/**
 * Every critical point between 1 K and 20000 K, highest temperature first.
 *
 * At a critical point a local minimum of the scaled curvature q(u) = x y g''/RT passes through
 * zero (then g'' = 0 and dq/du = 0, i.e. g''' = 0). The local minima of q are followed over
 * temperatures sampled evenly in ln T; where one changes sign, the temperature at which it is
 * zero is found by Brent's method, minimising q near the followed position at each trial T.
 * A minimum that dips below zero and comes back between samples (a small closed loop) is caught
 * by minimising its depth over T where the sampled depths have a local minimum close to zero.
 * A point found this way is kept only if the gap really closes there (its width shrinks towards
 * it like a square root), which excludes metastable points inside a wider stable gap.
 */
export function criticalPoints(model: BinaryModel, Tmin = T_SEARCH_MIN, Tmax = T_SEARCH_MAX): CriticalPoint[] {
  const Ts: number[] = [];
  for (let i = 0; i < SAMPLES; i++) Ts.push(Tmin * Math.pow(Tmax / Tmin, i / (SAMPLES - 1)));
  // Unstable intervals at T (-1 where g'' cannot be followed: parameters far too large for it).
  const spinodalAt = (T: number): Point[] | undefined => {
    try {
      return curvatureMap(model.at(T), false).spinodal;
    } catch {
      return undefined;
    }
  };
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

  const found: Array<{ T: number; u: number; kind: 'upper' | 'lower' }> = [];
  const depth = (T: number, u: number) => localMinimum(model.at(T), u);
  const rootBetween = (Ta: number, Tb: number, u: number) => {
    let uNow = u;
    const f = (T: number) => {
      const m = depth(T, uNow);
      uNow = m.u;
      return m.q;
    };
    const fa = f(Ta), fb = f(Tb);
    if (fa < 0 === fb < 0) return; // the followed minimum went elsewhere between samples
    uNow = u;
    const T = brentRoot(f, Ta, Tb, fa, fb, 1e-13 * Tb);
    if (Number.isNaN(T)) return;
    const m = depth(T, uNow);
    found.push({ T, u: m.u, kind: fa < 0 ? 'upper' : 'lower' });
  };

  for (let i = 0; i + 1 < SAMPLES; i++) {
    for (const [index, a] of minimaAt[i].entries()) {
      const b = follow(minimaAt[i], minimaAt[i + 1], index);
      if (!b) continue;
      if (a.q < 0 !== b.q < 0) rootBetween(Ts[i], Ts[i + 1], a.u);
      // a dip (or a bump) between samples: depth near zero with a local extremum in T
      const c = i + 2 < SAMPLES ? follow(minimaAt[i + 1], minimaAt[i + 2], minimaAt[i + 1].indexOf(b)) : undefined;
      if (c && b.q < 0 === a.q < 0 && b.q < 0 === c.q < 0 && Math.abs(b.q) < 0.2) {
        const sign = b.q > 0 ? 1 : -1;
        if (sign * (a.q - b.q) > 0 && sign * (c.q - b.q) > 0) {
          let uNow = b.u;
          const extreme = brentMin((T) => {
            const m = depth(T, uNow);
            uNow = m.u;
            return sign * m.q;
          }, Ts[i], Ts[i + 2], 1e-9 * Ts[i + 2]);
          const qx = sign * extreme.f;
          if (qx < 0 !== b.q < 0) {
            rootBetween(Ts[i], extreme.t, a.u);
            rootBetween(extreme.t, Ts[i + 2], uNow);
          }
        }
      }
    }
  }

  // A minimum can appear (in a fold, with q > 0) and cross zero between two samples, where no
  // minimum was there to follow. Wherever the number of unstable intervals changes between two
  // samples and no critical point was found, bisect on T down to 1e-12 and look at the interval
  // that appears: if q > 0 at its middle on the other side, a minimum crossed zero there.
  for (let i = 0; i + 1 < SAMPLES; i++) {
    if (intervals[i] < 0 || intervals[i + 1] < 0 || intervals[i] === intervals[i + 1]) continue;
    if (found.some((f) => f.T >= Ts[i] && f.T <= Ts[i + 1])) continue;
    let lo = Ts[i], hi = Ts[i + 1];
    let sLo = spinodalAt(lo), sHi = spinodalAt(hi);
    for (let k = 0; k < 80 && sLo && sHi && hi - lo > 1e-12 * hi; k++) {
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
      if (curvature(other, pointAt(u)) > 0) rootBetween(lo, hi, u);
    }
  }

  const points: CriticalPoint[] = [];
  for (const f of found) {
    if (points.some((p) => Math.abs(p.T - f.T) < 1e-9 * f.T && Math.abs(pointAt(f.u).x - p.x) < 1e-6)) continue;
    if (closesThere(model, f.T, f.u, f.kind)) points.push({ T: f.T, x: pointAt(f.u).x, kind: f.kind });
  }
  // highest temperature first; points at the same temperature (symmetric domes) from low x
  return points.sort((p, q) => (Math.abs(p.T - q.T) <= 1e-9 * p.T ? p.x - q.x : q.T - p.T));
}

/**
 * The minimum at the next sampled temperature that minimum `index` became. Local minima of q do
 * not cross one another, so with as many minima at both temperatures they pair in order of u,
 * however far they moved (near a dilute end u moves fast). Otherwise the nearest one, if within
 * 1 + |u|/4 in u.
 */
function follow(from: Track[], to: Track[], index: number): Track | undefined {
  if (from.length === to.length) return to[index];
  const u = from[index].u;
  let best: Track | undefined;
  for (const m of to) if (Math.abs(m.u - u) < 1 + 0.25 * Math.abs(u) && (!best || Math.abs(m.u - u) < Math.abs(best.u - u))) best = m;
  return best;
}

/** The local minimum of q nearest to u (searched from +-0.5 in u outwards: it may have moved far). */
function localMinimum(iso: Isotherm, u: number): { u: number; q: number } {
  return refineExtremum(iso, u - 0.5, u + 0.5, 1, 10, 1e-14);
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
  const dT = 1e-4 * Tc;
  const wide = width(dT), narrow = width(dT / 4);
  if (!(wide > 0 && narrow > 0)) return false;
  // and on the other side the gap must be gone (no gap around xc)
  if (width(-dT) > 0) return false;
  const ratio = narrow / wide;
  return ratio > 0.3 && ratio < 0.7;
}

/** The critical point numbered n (1 = highest temperature). */
export function criticalPoint(points: CriticalPoint[], n: number): CriticalPoint {
  if (points.length === 0) fail('none', `this system has no critical point between ${T_SEARCH_MIN} K and ${T_SEARCH_MAX} K`);
  if (!(n >= 1 && n <= points.length && Number.isInteger(n))) {
    fail('range', `critical point ${n} does not exist: this system has ${points.length} (numbered 1 to ${points.length}, highest temperature first)`);
  }
  return points[n - 1];
}
