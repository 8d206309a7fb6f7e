/**
 * The binodal curve at fixed T, traced tie-line by tie-line: a chart-ready table of tie-line ends.
 *
 * 1. Edge gaps. On each edge (i, j) of the triangle (the third fraction exactly 0) the system is the
 *    binary model of that pair. g is sampled along the edge (uniform in x_j plus dilute layers down
 *    to about 1e-290), the lower hull of the samples shows where the binary lower envelope has a
 *    chord, and Newton in v = ln(x_j / x_i) of both ends solves the binary equilibrium
 *      mu_i' = mu_i'',  mu_j' = mu_j''
 *    (the ternary mu_i, mu_j with the third fraction 0, which the spec makes the binary ones).
 * 2. Continuation. From an edge gap, the tie-lines form a one-parameter family: four unknowns
 *    u' = (ln(x_B'/x_A'), ln(x_C'/x_A')), u'' (the same of the other end) and three equations
 *      dg/dx_B' = dg/dx_B'',  dg/dx_C' = dg/dx_C'',  mu_A' = mu_A''
 *    (equal mu_A, mu_B, mu_C). The fourth equation is the pseudo-arclength condition
 *      t . (X - X_pred) = 0,
 *    X = (x_A', x_B', x_C', x_A'', x_B'', x_C''), t the unit secant of the last two tie-lines and
 *    X_pred = X_last + h t. The first tie-line off the edge has the third fraction of its first end
 *    fixed at 1e-7. Every accepted tie-line is checked on the lower convex envelope: its tangent
 *    plane lies below g at samples over the whole triangle (a grid of step 1/40 and layers down to
 *    1e-12 from every edge) and at the local minima of g minus the plane reached by Newton from
 *    every grid node where that difference is a local minimum below 0.05 RT.
 * 3. A branch ends
 *    - at a plait point, when the tie-line has shrunk below 1e-4 (steps are kept below a fifth of
 *      its length, so the continuation never steps past it): the plait point is the nearest one
 *      of ./plait;
 *    - at another edge, when the next step would leave the triangle: that edge's gap is the end
 *      (and is not traced again);
 *    - at a three-phase triangle, when a tie-line is no longer on the envelope: the side of the
 *      nearest triangle of ./threePhase is the end.
 * 4. Rows. The position along a branch is s = (arc length of the first ends) + (arc length of the
 *    second ends), in fractions. A branch's rows sit at evenly spaced s from its edge row to its
 *    end row; each is solved again (the traced polyline only predicts it) and checked on the
 *    envelope. Branches share the table's rows in proportion to their length, one #N/A row
 *    between branches, #N/A rows after the last.
 *
 * A two-phase region that touches no edge of the triangle (an island between two plait points, or
 * a region between a three-phase triangle and a plait point) is not found.
 */
import { fail, kelvin, msg } from '../errors';
import { solveInPlace } from './linear';
import { GB, GC, HBB, HBC, HCC, LOCAL_SIZE, MUA, MUB, MUC, type TernaryIsotherm, type TernaryModel } from './model';
import { plaitPointNear, plaitPoints } from './plait';
import type { TernaryPoint } from './split';
import { threePhaseTriangles, type ThreePhaseTriangle } from './threePhase';

/** A tie-line: its two ends. */
export type TieEnds = [TernaryPoint, TernaryPoint];

/** How a branch ends. */
export type BranchEnd = 'plait' | 'edge' | 'triangle';

export interface BinodalBranch {
  /** The edge the branch starts from, as its pair ('AB', 'AC' or 'BC'). */
  edge: 'AB' | 'AC' | 'BC';
  end: BranchEnd;
  /** Traced tie-lines from the edge gap (first) to the end (last: the plait point twice, another edge's gap, or a triangle side). */
  ties: TieEnds[];
  /** The position s of each tie-line (sum of the arc lengths of both ends from the edge). */
  s: number[];
}

/** Shortest tie-line traced before the plait point ends a branch. */
export const PLAIT_LENGTH = 1e-4;
/** Third fraction of the first tie-line off an edge. */
const FIRST_OFF_EDGE = 1e-7;
/** Largest continuation step (in X). */
const MAX_STEP = 0.02;
/** Smallest continuation step before the trace gives up. */
const MIN_STEP = 1e-9;

const PAIRS = [
  { name: 'AB', i: 0, j: 1, k: 2 },
  { name: 'AC', i: 0, j: 2, k: 1 },
  { name: 'BC', i: 1, j: 2, k: 0 },
] as const;

const at = (x: ArrayLike<number>, o: number): TernaryPoint => ({ xA: x[o], xB: x[o + 1], xC: x[o + 2] });
const dist = (p: TernaryPoint, q: TernaryPoint) => Math.hypot(p.xA - q.xA, p.xB - q.xB, p.xC - q.xC);
/** Spec order: increasing x_C, then x_B. */
const before = (p: TernaryPoint, q: TernaryPoint) => p.xC < q.xC || (p.xC === q.xC && p.xB < q.xB);

// ---------------------------------------------------------------------------------------------
// Edge gaps

const eLoc = new Float64Array(LOCAL_SIZE);
const MU = [MUA, MUB, MUC];

/** The point on edge (i, j) at v = ln(x_j / x_i), third fraction 0, each fraction to full precision. */
function edgePoint(i: number, j: number, v: number): TernaryPoint {
  const x = [0, 0, 0];
  if (v > 0) { const e = Math.exp(-v); x[i] = e / (1 + e); x[j] = 1 / (1 + e); } else { const e = Math.exp(v); x[i] = 1 / (1 + e); x[j] = e / (1 + e); }
  return { xA: x[0], xB: x[1], xC: x[2] };
}

function edgeMu(iso: TernaryIsotherm, i: number, j: number, v: number, out: number[]): boolean {
  const p = edgePoint(i, j, v);
  iso.local(p.xA, p.xB, p.xC, eLoc);
  out[0] = eLoc[MU[i]] / iso.RT; out[1] = eLoc[MU[j]] / iso.RT;
  return Number.isFinite(out[0]) && Number.isFinite(out[1]);
}

/** Newton on mu_i' = mu_i'', mu_j' = mu_j'' in (v', v''), Jacobian by central differences. */
function edgeNewton(iso: TernaryIsotherm, i: number, j: number, v1: number, v2: number): [number, number] | undefined {
  const m1 = [0, 0], m2 = [0, 0], a = [0, 0], b = [0, 0];
  const F = new Float64Array(2), Jm = new Float64Array(4);
  const resid = (p: number, q: number) => {
    if (!edgeMu(iso, i, j, p, m1) || !edgeMu(iso, i, j, q, m2)) return Infinity;
    F[0] = m1[0] - m2[0]; F[1] = m1[1] - m2[1];
    return Math.max(Math.abs(F[0]), Math.abs(F[1]));
  };
  let norm = resid(v1, v2), small = 0;
  for (let it = 0; it < 60; it++) {
    if (!Number.isFinite(norm)) return undefined;
    const f0 = F[0], f1 = F[1];
    const h1 = 1e-6 * Math.max(1, Math.abs(v1)), h2 = 1e-6 * Math.max(1, Math.abs(v2));
    if (!edgeMu(iso, i, j, v1 + h1, a) || !edgeMu(iso, i, j, v1 - h1, b)) return undefined;
    Jm[0] = (a[0] - b[0]) / (2 * h1); Jm[2] = (a[1] - b[1]) / (2 * h1);
    if (!edgeMu(iso, i, j, v2 + h2, a) || !edgeMu(iso, i, j, v2 - h2, b)) return undefined;
    Jm[1] = -(a[0] - b[0]) / (2 * h2); Jm[3] = -(a[1] - b[1]) / (2 * h2);
    const st = new Float64Array([-f0, -f1]);
    if (!solveInPlace(Jm, st, 2)) return undefined;
    let s1 = st[0], s2 = st[1];
    const big = Math.max(Math.abs(s1), Math.abs(s2));
    if (big > 5) { s1 *= 5 / big; s2 *= 5 / big; }
    let t = 1, n = norm;
    for (let tries = 0; tries < 20; tries++) {
      n = resid(v1 + t * s1, v2 + t * s2);
      if (n < norm || n < 1e-14) break;
      t /= 2;
    }
    if (!(n < norm || n < 1e-14)) return norm < 1e-11 ? [v1, v2] : undefined;
    v1 += t * s1; v2 += t * s2; norm = n;
    if (big * t < 1e-13 * Math.max(1, Math.abs(v1), Math.abs(v2)) && norm < 1e-11) {
      if (++small >= 2) break;
    }
  }
  if (!(norm < 1e-11) || Math.abs(v1 - v2) < 1e-6) return undefined;
  return [v1, v2];
}

let edgeSamples: number[] | undefined;

/** The v = ln(x_j / x_i) of the edge samples, increasing. */
function edgeGrid(): number[] {
  if (edgeSamples) return edgeSamples;
  const v = new Set<number>();
  const N = 240;
  for (let n = 1; n < N; n++) v.add(Math.log(n / (N - n)));
  for (const d of [8, 11, 15, 20, 27, 36, 48, 64, 85, 115, 150, 200, 260, 330, 420, 540, 660]) { v.add(d); v.add(-d); }
  edgeSamples = [...v].sort((p, q) => p - q);
  return edgeSamples;
}

/** Every binary gap on the edge of the pair, as tie-lines with the third fraction 0, in spec order. */
function edgeGaps(iso: TernaryIsotherm, i: number, j: number): TieEnds[] {
  const vs = edgeGrid();
  // samples in (x_j, g); the pure ends x_j = 0 and 1 close the hull
  const X: number[] = [0], G: number[] = [0], V: number[] = [-Infinity];
  for (const v of vs) {
    const p = edgePoint(i, j, v);
    X.push([p.xA, p.xB, p.xC][j]); G.push(iso.g(p.xA, p.xB, p.xC)); V.push(v);
  }
  X.push(1); G.push(0); V.push(Infinity);
  // lower hull (monotone chain)
  const hull: number[] = [];
  for (let n = 0; n < X.length; n++) {
    while (hull.length >= 2) {
      const a = hull[hull.length - 2], b = hull[hull.length - 1];
      if ((X[b] - X[a]) * (G[n] - G[a]) - (G[b] - G[a]) * (X[n] - X[a]) <= 0) hull.pop(); else break;
    }
    hull.push(n);
  }
  const tol = 1e-9 * iso.RT;
  const gaps: TieEnds[] = [];
  for (let h = 0; h + 1 < hull.length; h++) {
    const a = hull[h], b = hull[h + 1];
    if (b - a < 2) continue;
    let above = false;
    for (let n = a + 1; n < b; n++) {
      const chord = G[a] + ((G[b] - G[a]) * (X[n] - X[a])) / (X[b] - X[a]);
      if (G[n] - chord > tol) { above = true; break; }
    }
    if (!above) continue;
    const v1 = Number.isFinite(V[a]) ? V[a] : V[a + 1], v2 = Number.isFinite(V[b]) ? V[b] : V[b - 1];
    const r = edgeNewton(iso, i, j, v1, v2);
    if (!r) fail('convergence', msg`the binary gap on the ${'ABC'[i]}–${'ABC'[j]} edge at T = ${kelvin(iso.T)} did not converge`);
    const p = edgePoint(i, j, r[0]), q = edgePoint(i, j, r[1]);
    if (gaps.some(([s, t]) => dist(s, p) + dist(t, q) < 1e-9 || dist(s, q) + dist(t, p) < 1e-9)) continue;
    gaps.push(before(p, q) ? [p, q] : [q, p]);
  }
  return gaps;
}

// ---------------------------------------------------------------------------------------------
// The corrector: Newton in (u', u'') on equal potentials and the arclength plane

const loc2 = [new Float64Array(LOCAL_SIZE), new Float64Array(LOCAL_SIZE)];
const J4 = new Float64Array(16), r4 = new Float64Array(4), step4 = new Float64Array(4);
const uNow = new Float64Array(4), uTry = new Float64Array(4), xNow = new Float64Array(6), xTry = new Float64Array(6);

function fromU(uB: number, uC: number, x: Float64Array, o: number): void {
  const m = Math.max(0, uB, uC);
  const a = Math.exp(-m), b = Math.exp(uB - m), c = Math.exp(uC - m), s = a + b + c;
  x[o] = a / s; x[o + 1] = b / s; x[o + 2] = c / s;
}

/** Residuals at x (both ends) against the plane t . (x - xp) = 0; the largest, or Infinity. */
function residuals(iso: TernaryIsotherm, x: Float64Array, t: Float64Array, xp: Float64Array, out: Float64Array): number {
  iso.local(x[0], x[1], x[2], loc2[0]);
  iso.local(x[3], x[4], x[5], loc2[1]);
  const RT = iso.RT, p = loc2[0], q = loc2[1];
  out[0] = (p[GB] - q[GB]) / RT;
  out[1] = (p[GC] - q[GC]) / RT;
  out[2] = (p[MUA] - q[MUA]) / RT;
  let c = 0;
  for (let n = 0; n < 6; n++) c += t[n] * (x[n] - xp[n]);
  out[3] = c;
  let norm = 0;
  for (let n = 0; n < 4; n++) norm = Math.max(norm, Math.abs(out[n]));
  return Number.isFinite(norm) ? norm : Infinity;
}

/**
 * The tie-line on the plane t . (X - xp) = 0 nearest the start (Newton from `start`), into `out`;
 * false when Newton fails or the two ends coincide.
 */
function correct(iso: TernaryIsotherm, start: Float64Array, t: Float64Array, xp: Float64Array, out: Float64Array): boolean {
  for (let q = 0; q < 2; q++) {
    const a = start[3 * q], b = start[3 * q + 1], c = start[3 * q + 2];
    if (!(a > 0 && b > 0 && c > 0)) return false;
    uNow[2 * q] = Math.log(b) - Math.log(a); uNow[2 * q + 1] = Math.log(c) - Math.log(a);
  }
  fromU(uNow[0], uNow[1], xNow, 0); fromU(uNow[2], uNow[3], xNow, 3);
  let norm = residuals(iso, xNow, t, xp, r4), small = 0;
  const RT = iso.RT;
  for (let it = 0; it < 40; it++) {
    if (!Number.isFinite(norm)) return false;
    J4.fill(0);
    for (let q = 0; q < 2; q++) {
      const L = loc2[q], sign = (q === 0 ? 1 : -1) / RT;
      const a = xNow[3 * q], b = xNow[3 * q + 1], c = xNow[3 * q + 2];
      const hBB = L[HBB], hBC = L[HBC], hCC = L[HCC];
      // dx/du = [[x_B (x_A + x_C), -x_B x_C], [-x_B x_C, x_C (x_A + x_B)]] in (x_B, x_C)
      const dBB = b * (a + c), dBC = -b * c, dCC = c * (a + b);
      const mB = -(b * hBB + c * hBC), mC = -(b * hBC + c * hCC);
      J4[0 * 4 + 2 * q] = sign * (hBB * dBB + hBC * dBC);
      J4[0 * 4 + 2 * q + 1] = sign * (hBB * dBC + hBC * dCC);
      J4[1 * 4 + 2 * q] = sign * (hBC * dBB + hCC * dBC);
      J4[1 * 4 + 2 * q + 1] = sign * (hBC * dBC + hCC * dCC);
      J4[2 * 4 + 2 * q] = sign * (mB * dBB + mC * dBC);
      J4[2 * 4 + 2 * q + 1] = sign * (mB * dBC + mC * dCC);
      // the plane: dx/du_B = (-x_A x_B, x_B (x_A + x_C), -x_B x_C), dx/du_C = (-x_A x_C, -x_B x_C, x_C (x_A + x_B))
      const tA = t[3 * q], tB = t[3 * q + 1], tC = t[3 * q + 2];
      J4[3 * 4 + 2 * q] = -tA * a * b + tB * b * (a + c) - tC * b * c;
      J4[3 * 4 + 2 * q + 1] = -tA * a * c - tB * b * c + tC * c * (a + b);
    }
    const st = step4;
    for (let n = 0; n < 4; n++) st[n] = -r4[n];
    if (!solveInPlace(J4, st, 4)) return false;
    let big = 0;
    for (let n = 0; n < 4; n++) big = Math.max(big, Math.abs(st[n]));
    const cap = big > 2 ? 2 / big : 1;
    let s = cap, ok = false, n2 = norm;
    for (let tries = 0; tries < 16; tries++) {
      for (let n = 0; n < 4; n++) uTry[n] = uNow[n] + s * st[n];
      fromU(uTry[0], uTry[1], xTry, 0); fromU(uTry[2], uTry[3], xTry, 3);
      n2 = residuals(iso, xTry, t, xp, r4);
      if (n2 < norm || n2 < 1e-14) { ok = true; break; }
      s /= 2;
    }
    if (!ok) {
      if (norm < 1e-11) break;
      return false;
    }
    uNow.set(uTry); xNow.set(xTry); norm = n2;
    if (big * s < 1e-12 && norm < 1e-11) {
      if (++small >= 2) break;
    }
  }
  if (!(norm < 1e-11)) return false;
  for (let n = 0; n < 6; n++) if (!(xNow[n] > 1e-300)) return false;
  if (Math.hypot(xNow[0] - xNow[3], xNow[1] - xNow[4], xNow[2] - xNow[5]) < 1e-7) return false;
  out.set(xNow);
  return true;
}

// ---------------------------------------------------------------------------------------------
// Tracing a branch

const pack = (e: TieEnds) => Float64Array.of(e[0].xA, e[0].xB, e[0].xC, e[1].xA, e[1].xB, e[1].xC);
const unpack = (x: Float64Array): TieEnds => [at(x, 0), at(x, 3)];
const length = (x: Float64Array) => Math.hypot(x[0] - x[3], x[1] - x[4], x[2] - x[5]);

function unit(v: Float64Array): Float64Array {
  let n = 0;
  for (const c of v) n += c * c;
  n = Math.sqrt(n);
  return v.map((c) => c / n);
}

/** s-increment between two tie-lines: the arc length of both ends. */
const ds = (p: TieEnds, q: TieEnds) => dist(p[0], q[0]) + dist(p[1], q[1]);

interface Context {
  model: TernaryModel;
  T: number;
  iso: TernaryIsotherm;
  gaps: Array<{ pair: (typeof PAIRS)[number]; ends: TieEnds; used: boolean }>;
  plaits?: TernaryPoint[];
  triangles?: ThreePhaseTriangle[];
  samples?: { x: Float64Array; g: Float64Array; n: number; grid: number; D: Float64Array };
}

/** Step of the grid of the envelope check. */
const GRID = 40;
const node = (i: number, j: number) => (i * (2 * GRID + 3 - i)) / 2 + j;

/**
 * Samples for the envelope check: a triangular grid of step 1/40 (edges and corners included;
 * node (i, j) has x_A = i/40, x_B = j/40) and layers at 1e-3 ... 1e-12 from every edge.
 */
function envelopeSamples(iso: TernaryIsotherm): Context['samples'] {
  const N = GRID, pts: number[] = [];
  for (let i = 0; i <= N; i++) for (let j = 0; i + j <= N; j++) pts.push(i / N, j / N, (N - i - j) / N);
  const grid = pts.length / 3;
  for (const d of [1e-3, 1e-6, 1e-9, 1e-12]) {
    for (let j = 1; j < N; j++) {
      const p = ((1 - d) * j) / N, q = ((1 - d) * (N - j)) / N;
      pts.push(d, p, q, p, d, q, p, q, d);
    }
  }
  const n = pts.length / 3, x = Float64Array.from(pts), g = new Float64Array(n);
  for (let k = 0; k < n; k++) g[k] = iso.g(x[3 * k], x[3 * k + 1], x[3 * k + 2]);
  return { x, g, n, grid, D: new Float64Array(n) };
}

const sLoc = new Float64Array(LOCAL_SIZE);
/** The six neighbours (di, dj) of a node of the triangular grid. */
const NEIGHBOURS = [1, 0, -1, 0, 0, 1, 0, -1, 1, -1, -1, 1];
/** A grid minimum of g minus the plane this close to 0 (in RT) away from a tie-line's ends is followed by Newton. */
const NEAR_PLANE = 0.05;

/**
 * Whether the tie-line x lies on the lower convex envelope: the common tangent plane
 * sum_i mu_i x_i lies below g (both ends have the same plane, equal potentials). D = g - plane is
 * taken at the samples: below 0 (beyond rounding) away from the ends is a cut; from a grid node
 * away from the ends where D is a local minimum among its neighbours and below 0.05 RT (where a
 * third phase could be forming between nodes), Newton finds the local minimum of D, and a minimum
 * below 0 is a cut. (The tolerance is 1e-9 RT; the split's own check is `onEnvelope` of ./split.)
 */
function stable(c: Context, x: Float64Array): boolean {
  const samples = (c.samples ??= envelopeSamples(c.iso))!;
  const { x: X, g, n, D } = samples;
  c.iso.local(x[0], x[1], x[2], sLoc);
  const mA = sLoc[MUA], mB = sLoc[MUB], mC = sLoc[MUC], RT = c.iso.RT, tol = 1e-9 * RT;
  const r2 = (2 / GRID) ** 2;
  const away = (k: number) => {
    const a = X[3 * k], b = X[3 * k + 1], cc = X[3 * k + 2];
    return (a - x[0]) ** 2 + (b - x[1]) ** 2 + (cc - x[2]) ** 2 > r2 && (a - x[3]) ** 2 + (b - x[4]) ** 2 + (cc - x[5]) ** 2 > r2;
  };
  let suspect = false;
  for (let k = 0; k < n; k++) {
    D[k] = g[k] - (mA * X[3 * k] + mB * X[3 * k + 1] + mC * X[3 * k + 2]);
    if (D[k] < -tol && away(k)) return false;
  }
  for (let i = 0; i <= GRID && !suspect; i++) {
    for (let j = 0; i + j <= GRID; j++) {
      const k = node(i, j);
      if (!(D[k] < NEAR_PLANE * RT) || !away(k)) continue;
      let lowest = true;
      for (let m = 0; m < 12; m += 2) {
        const ii = i + NEIGHBOURS[m], jj = j + NEIGHBOURS[m + 1];
        if (ii < 0 || jj < 0 || ii + jj > GRID) continue;
        if (D[node(ii, jj)] < D[k]) { lowest = false; break; }
      }
      if (lowest && minimumOfD(c.iso, mA, mB, mC, X[3 * k], X[3 * k + 1], X[3 * k + 2], x) < -tol) { suspect = true; break; }
    }
  }
  return !suspect;
}

const mLoc = new Float64Array(LOCAL_SIZE);

/**
 * D = g - (mA x_A + mB x_B + mC x_C) at the local minimum reached from (a, b, c) by Newton in
 * (x_B, x_C) (a gradient step where the Hessian is not positive definite; backtracking on D,
 * steps kept inside the triangle); +Infinity when it runs into a tie-line end (D = 0 there).
 */
function minimumOfD(iso: TernaryIsotherm, mA: number, mB: number, mC: number, a: number, b: number, c: number, ends: Float64Array): number {
  // a grid node on an edge or a corner starts just inside
  const lift = 1e-9;
  a = Math.max(a, lift); b = Math.max(b, lift); c = Math.max(c, lift);
  const s0 = a + b + c; a /= s0; b /= s0; c /= s0;
  const Dat = (p: number, q: number, r: number) => iso.g(p, q, r) - (mA * p + mB * q + mC * r);
  let D = Dat(a, b, c);
  for (let it = 0; it < 40; it++) {
    iso.local(a, b, c, mLoc);
    const eB = mLoc[GB] - (mB - mA), eC = mLoc[GC] - (mC - mA);
    const hBB = mLoc[HBB], hBC = mLoc[HBC], hCC = mLoc[HCC], det = hBB * hCC - hBC * hBC;
    let sB: number, sC: number;
    if (hBB > 0 && det > 0) { sB = -(hCC * eB - hBC * eC) / det; sC = -(hBB * eC - hBC * eB) / det; } else {
      const gn = Math.hypot(eB, eC) || 1;
      sB = (-0.05 * eB) / gn; sC = (-0.05 * eC) / gn;
    }
    // stay inside: no fraction below half its value
    let t = 1;
    if (b + t * sB < 0.5 * b) t = (-0.5 * b) / sB;
    if (c + t * sC < 0.5 * c) t = (-0.5 * c) / sC;
    if (a - t * (sB + sC) < 0.5 * a) t = (0.5 * a) / (sB + sC);
    let moved = false;
    for (let tries = 0; tries < 30; tries++) {
      const nb = b + t * sB, nc = c + t * sC, na = a - t * (sB + sC);
      const Dn = Dat(na, nb, nc);
      if (Dn < D) { a = na; b = nb; c = nc; D = Dn; moved = true; break; }
      t /= 2;
    }
    const near = Math.min(Math.hypot(a - ends[0], b - ends[1], c - ends[2]), Math.hypot(a - ends[3], b - ends[4], c - ends[5]));
    if (near < 1e-3) return Infinity;
    if (!moved || t * Math.hypot(sB, sC) < 1e-12) break;
  }
  return D;
}

function trace(c: Context, g: Context['gaps'][number]): BinodalBranch {
  const { iso, T } = c, k = g.pair.k;
  g.used = true;
  const ties: TieEnds[] = [g.ends];
  const X0 = pack(g.ends);
  // the first tie-line off the edge: third fraction of the first end = 1e-7
  const start = X0.map((v, n) => (n % 3 === k ? FIRST_OFF_EDGE : v * (1 - FIRST_OFF_EDGE)));
  const t0 = new Float64Array(6); t0[k] = 1;
  let X = new Float64Array(6);
  if (!correct(iso, start, t0, start, X)) {
    fail('convergence', msg`the tie-lines off the ${g.pair.name[0]}–${g.pair.name[1]} edge gap at T = ${kelvin(T)} could not be traced`);
  }
  const done = (end: BranchEnd, last?: TieEnds): BinodalBranch => {
    if (last) ties.push(last);
    const s = [0];
    for (let n = 1; n < ties.length; n++) s.push(s[n - 1] + ds(ties[n - 1], ties[n]));
    return { edge: g.pair.name, end, ties, s };
  };
  if (!stable(c, X)) return done('triangle', triangleSide(c, g, X));
  ties.push(unpack(X));
  let tangent = unit(X.map((v, n) => v - X0[n]));
  let h = Math.min(0.005, 0.2 * length(X));
  const next = new Float64Array(6);
  for (let steps = 0; steps < 5000; steps++) {
    const ell = length(X);
    if (ell < PLAIT_LENGTH) return done('plait', plaitEnd(c, g, X));
    h = Math.min(h, 0.2 * ell);
    const xp = X.map((v, n) => v + h * tangent[n]);
    if (xp.some((v) => !(v > 0))) {
      // the next step leaves the triangle: the branch ends on another edge when one of its gaps is near
      const end = edgeEnd(c, g, X, 3 * h);
      if (end) return done('edge', end);
      h /= 2;
      if (h < MIN_STEP) break;
      continue;
    }
    if (!correct(iso, xp, tangent, xp, next) || Math.sqrt(next.reduce((a, v, n) => a + (v - xp[n]) ** 2, 0)) > 0.5 * h) {
      h /= 2;
      if (h < MIN_STEP) break;
      continue;
    }
    if (!stable(c, next)) {
      if (h > 1e-3) { h /= 4; continue; }
      return done('triangle', triangleSide(c, g, X));
    }
    tangent = unit(next.map((v, n) => v - X[n]));
    X = next.slice();
    ties.push(unpack(X));
    h = Math.min(1.5 * h, MAX_STEP);
  }
  // a short tie-line that no step can follow is at a plait point (the last tie-lines before it are
  // nearly singular)
  if (length(X) < 100 * PLAIT_LENGTH) return done('plait', plaitEnd(c, g, X));
  fail('convergence', msg`the binodal curve from the ${g.pair.name[0]}–${g.pair.name[1]} edge at T = ${kelvin(T)} could not be traced further than the tie-line (${X[0]}, ${X[1]}, ${X[2]}) – (${X[3]}, ${X[4]}, ${X[5]})`);
}

function plaitEnd(c: Context, g: Context['gaps'][number], X: Float64Array): TieEnds {
  const mid = { xA: (X[0] + X[3]) / 2, xB: (X[1] + X[4]) / 2, xC: (X[2] + X[5]) / 2 };
  const near = 1e-3 + 10 * length(X);
  // Newton from the shrunken tie-line's middle; the grid search of every plait point only if that fails
  let best = plaitPointNear(c.model, c.T, mid), d = best ? dist(best, mid) : Infinity;
  if (!best || d > near) {
    c.plaits ??= plaitPoints(c.model, c.T);
    for (const p of c.plaits) if (dist(p, mid) < d) { d = dist(p, mid); best = p; }
  }
  if (!best || d > near) {
    fail('convergence', msg`the tie-lines from the ${g.pair.name[0]}–${g.pair.name[1]} edge at T = ${kelvin(c.T)} shrink toward (${mid.xA}, ${mid.xB}, ${mid.xC}), but no plait point was found there`);
  }
  return [best, best];
}

function edgeEnd(c: Context, g: Context['gaps'][number], X: Float64Array, within: number): TieEnds | undefined {
  for (const o of c.gaps) {
    if (o === g || o.used) continue;
    const [p, q] = o.ends;
    const a = dist(p, at(X, 0)) + dist(q, at(X, 3)), b = dist(q, at(X, 0)) + dist(p, at(X, 3));
    if (Math.min(a, b) < within) {
      o.used = true;
      return a <= b ? [p, q] : [q, p];
    }
  }
  return undefined;
}

function triangleSide(c: Context, g: Context['gaps'][number], X: Float64Array): TieEnds {
  c.triangles ??= threePhaseTriangles(c.model, c.T);
  let best: TieEnds | undefined, d = Infinity;
  for (const tri of c.triangles) {
    for (const [m, n] of [[0, 1], [0, 2], [1, 2]]) {
      const p = tri.phases[m], q = tri.phases[n];
      const a = dist(p, at(X, 0)) + dist(q, at(X, 3)), b = dist(q, at(X, 0)) + dist(p, at(X, 3));
      if (a < d) { d = a; best = [p, q]; }
      if (b < d) { d = b; best = [q, p]; }
    }
  }
  if (!best || d > 0.1) {
    fail('convergence', msg`the tie-lines from the ${g.pair.name[0]}–${g.pair.name[1]} edge at T = ${kelvin(c.T)} leave the lower envelope near (${X[0]}, ${X[1]}, ${X[2]}) – (${X[3]}, ${X[4]}, ${X[5]}), but no three-phase triangle was found there`);
  }
  return best;
}

function traceAll(model: TernaryModel, T: number): { c: Context; branches: BinodalBranch[] } {
  if (!(Number.isFinite(T) && T > 0)) fail('range', `the temperature must be above 0 K (got ${T} K)`);
  const iso = model.at(T);
  const c: Context = { model, T, iso, gaps: [] };
  for (const pair of PAIRS) for (const ends of edgeGaps(iso, pair.i, pair.j)) c.gaps.push({ pair, ends, used: false });
  const branches: BinodalBranch[] = [];
  for (const g of c.gaps) if (!g.used) branches.push(trace(c, g));
  return { c, branches };
}

/**
 * Every branch of the binodal curve at T that starts on an edge: its traced tie-lines from the edge
 * gap to its end. An empty list when no edge has a gap.
 */
export function binodalBranches(model: TernaryModel, T: number): BinodalBranch[] {
  return traceAll(model, T).branches;
}

/**
 * The rows of a branch at n evenly spaced positions s (first: the edge gap, last: the end), each
 * a tie-line solved anew and checked on the envelope.
 */
function rowsOf(c: Context, b: BinodalBranch, n: number): TieEnds[] {
  const iso = c.iso;
  const S = b.s[b.s.length - 1], out: TieEnds[] = [b.ties[0]];
  const X = new Float64Array(6);
  let seg = 0;
  for (let r = 1; r < n - 1; r++) {
    const target = (S * r) / (n - 1);
    while (seg < b.s.length - 2 && b.s[seg + 1] < target) seg++;
    const p = pack(b.ties[seg]), q = pack(b.ties[seg + 1]);
    const span = b.s[seg + 1] - b.s[seg];
    const w = span > 0 ? (target - b.s[seg]) / span : 0;
    const xp = p.map((v, m) => v + w * (q[m] - v));
    const t = unit(q.map((v, m) => v - p[m]));
    // the first traced segment starts on the edge (a zero fraction) and the last may end at a
    // plait point (a zero-length tie-line): a row there is the traced tie-line beside it
    const nearEdge = seg === 0, nearPlait = b.end === 'plait' && seg === b.ties.length - 2;
    if (nearEdge || nearPlait) { out.push(b.ties[nearEdge ? 1 : b.ties.length - 2]); continue; }
    if (!correct(iso, xp, t, xp, X) || !stable(c, X)) {
      fail('convergence', msg`a tie-line of the binodal curve at T = ${kelvin(iso.T)} near (${xp[0]}, ${xp[1]}, ${xp[2]}) – (${xp[3]}, ${xp[4]}, ${xp[5]}) did not converge`);
    }
    out.push(unpack(X));
  }
  out.push(b.ties[b.ties.length - 1]);
  return out;
}

/**
 * The binodal table at T with `rows` rows: the branches one after the other (rows in proportion to
 * their length, at least two each), undefined (#N/A) between branches and after the last. Fails
 * with 'none' when no edge has a gap, 'range' when the rows cannot hold every branch.
 */
export function binodalTable(model: TernaryModel, T: number, rows: number): Array<TieEnds | undefined> {
  const { c, branches } = traceAll(model, T);
  if (branches.length === 0) fail('none', msg`no binary edge has a miscibility gap at T = ${kelvin(T)}: no binodal curve starts on an edge`);
  const need = 3 * branches.length - 1;
  if (rows < need) fail('range', `the binodal curve has ${branches.length} branches: ask for at least ${need} rows (two per branch and one between branches)`);
  const free = rows - (branches.length - 1);
  const L = branches.map((b) => b.s[b.s.length - 1]), total = L.reduce((a, v) => a + v, 0);
  // (a share within 1e-9 of a whole number is that number: equal branches get equal rows)
  const counts = branches.map((_, n) => 2 + Math.floor(((free - 2 * branches.length) * L[n]) / total + 1e-9));
  const out: Array<TieEnds | undefined> = [];
  branches.forEach((b, n) => {
    if (n > 0) out.push(undefined);
    out.push(...rowsOf(c, b, counts[n]));
  });
  while (out.length < rows) out.push(undefined);
  return out;
}
