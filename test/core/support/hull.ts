/**
 * Independent miscibility gaps: the lower convex hull of g sampled on a uniform grid, computed by
 * a general-purpose hull routine from the registry (d3-polygon's polygonHull, Andrew's monotone
 * chain), then each gap refined on its own by Newton's method on the spec's common-tangent
 * equations with symbolic derivatives (./symbolic.ts). Nothing here imports from src/.
 */
import { polygonHull } from 'd3-polygon';
import type { Reference } from './symbolic';

export interface HullGap {
  /** Ends of a long edge of the lower hull: the grid points that bound the gap. */
  low: number;
  high: number;
}

/**
 * Gaps of g(x) (g(0) = g(1) = 0: the pure components are the reference states) from the lower
 * hull of n uniform samples. An edge of the lower hull that skips grid points is a gap; where g
 * is strictly convex the hull passes through every sample. `minCells`: how many grid cells an
 * edge must span to count (a gap narrower than that is not resolved by the grid).
 */
export function hullGaps(g: (x: number, y: number) => number, n: number, minCells = 10): { h: number; gaps: HullGap[] } {
  const h = 1 / (n - 1);
  const points: Array<[number, number]> = [];
  for (let i = 0; i < n; i++) {
    const x = i / (n - 1);
    points.push([x, i === 0 || i === n - 1 ? 0 : g(x, 1 - x)]);
  }
  const hull = polygonHull(points);
  if (!hull) throw new Error('no hull');
  // The hull is a closed polygon through (0, 0) and (1, 0); of its two chains between them, the
  // lower one has its vertices below the chord y = 0 and the upper one above it (either may be the
  // chord itself): the lower chain is the one with the smaller sum of heights.
  const m = hull.length;
  const left = hull.findIndex((p) => p[0] === 0), right = hull.findIndex((p) => p[0] === 1);
  const chain = (step: number) => {
    const out: Array<[number, number]> = [];
    for (let i = left; ; i = (i + step + m) % m) {
      out.push(hull[i]);
      if (i === right) return out;
    }
  };
  const height = (c: Array<[number, number]>) => c.reduce((sum, p) => sum + p[1], 0);
  const forward = chain(1), backward = chain(-1);
  const lower = height(forward) < height(backward) ? forward : backward;
  const gaps: HullGap[] = [];
  for (let i = 0; i + 1 < lower.length; i++) {
    if (lower[i + 1][0] - lower[i][0] > minCells * h) gaps.push({ low: lower[i][0], high: lower[i + 1][0] });
  }
  return { h, gaps };
}

/**
 * The common tangent near (u1, u2), u = ln(x/(1-x)), by Newton's method on
 *   F1 = g'(x1) - g'(x2) = 0,  F2 = mu_A(x1) - mu_A(x2) = 0   (mu_A = g - x g', spec)
 * with d g'/du = x y g'' and d mu_A/du = -x (x y g''), step halved while it does not reduce |F|.
 * Derivatives come from the symbolic reference at x computed from u in decimal arithmetic.
 */
export function refineTangent(ref: Reference, T: number, u1: number, u2: number): { u1: number; u2: number; residual: number } {
  const at = (u: number) => {
    const x = 1 / (1 + Math.exp(-u));
    const g = ref.atU(0, u, T).value, dg = ref.atU(1, u, T).value, d2g = ref.atU(2, u, T).value;
    return { x, dg, muA: g - x * dg, c: x * (1 - x) * d2g };
  };
  const residual = (a: ReturnType<typeof at>, b: ReturnType<typeof at>) => Math.hypot(a.dg - b.dg, a.muA - b.muA);
  let p1 = at(u1), p2 = at(u2);
  let r = residual(p1, p2);
  for (let iter = 0; iter < 60; iter++) {
    const F1 = p1.dg - p2.dg, F2 = p1.muA - p2.muA;
    // [c1, -c2; -x1 c1, x2 c2] [du1; du2] = -[F1; F2]
    const det = p1.c * p2.c * (p2.x - p1.x);
    const du1 = (-F1 * p2.x * p2.c - F2 * p2.c) / det;
    const du2 = (-F2 * p1.c - F1 * p1.x * p1.c) / det;
    let t = 1;
    for (let k = 0; k < 40; k++, t /= 2) {
      const q1 = at(u1 + t * du1), q2 = at(u2 + t * du2);
      const rq = residual(q1, q2);
      if (rq < r || k === 39) {
        u1 += t * du1; u2 += t * du2; p1 = q1; p2 = q2; r = rq;
        break;
      }
    }
    if (Math.abs(t * du1) < 1e-15 * Math.max(1, Math.abs(u1)) && Math.abs(t * du2) < 1e-15 * Math.max(1, Math.abs(u2))) break;
  }
  return { u1, u2, residual: r };
}

/** u = ln(x/(1-x)). */
export const logit = (x: number) => Math.log(x) - Math.log1p(-x);
