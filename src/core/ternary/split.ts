/**
 * The phase split of a ternary feed at fixed T: the face of the lower convex envelope of g over the
 * composition triangle that contains the feed (one, two or three phases), with the phase
 * compositions and phase fractions (moles of phase per mole of feed; per mole of sites for
 * Flory–Huggins).
 *
 * 1. Candidates: g sampled on a fixed set of compositions (a uniform triangular grid plus layers at
 *    dilutions 1e-2 ... 1e-14 along every edge, so dilute corners are sampled). The envelope at the
 *    feed z over the samples is the linear programme
 *      min sum_k lambda_k g_k  subject to  sum_k lambda_k x_k = z, lambda >= 0,
 *    solved by the revised simplex method with a 3 x 3 basis, starting from the three pure
 *    components (lambda = z). Its basis points that carry the feed, merged when neighbours, are
 *    the candidate phases; its dual is the supporting plane.
 * 2. Newton on the equilibrium equations in log-ratio coordinates u = (ln(x_B/x_A), ln(x_C/x_A)) of
 *    each phase (every fraction then keeps its relative precision, however dilute):
 *    two phases: equal dg/dx_B, dg/dx_C and mu_A, and the feed on the tie-line
 *      det[x'; x''; z] = 0 (all three fractions of each, relative to the size of its terms);
 *    three phases: equal dg/dx_B, dg/dx_C and mu_A in all three.
 * 3. Check: the plane sum_i mu_i x_i through the phases must lie below g at every sample and at
 *    every local minimum of g minus the plane found from the lowest samples (tolerance 1e-10 of
 *    RT plus the size of mu). A plane that cuts g is never returned: the offending composition
 *    joins the samples and the search runs again; after four rounds the split fails with
 *    reason 'convergence'.
 *
 * A feed must have all three fractions > 0: on an edge the system is the binary one of that pair,
 * whose functions answer it (and a feed 1e-12 off the edge splits like the binary gap).
 */
import { fail, kelvin, msg } from '../errors';
import { solveInPlace } from './linear';
import { checkComposition, GB, GC, HBB, HBC, HCC, LOCAL_SIZE, MUA, MUB, MUC, type TernaryIsotherm, type TernaryModel } from './model';

/** A composition: the three fractions, each to full relative precision. */
export interface TernaryPoint {
  xA: number;
  xB: number;
  xC: number;
}

export interface TernarySplit {
  T: number;
  /** 1, 2 or 3 phases, by increasing x_C, then x_B (phase 1 is the poorest in C). */
  phases: TernaryPoint[];
  /** Moles of each phase per mole of feed (sites per site for Flory–Huggins); they sum to 1. */
  fractions: number[];
  /** The common chemical potentials mu_A, mu_B, mu_C, per mole of sites for Flory–Huggins, J/mol. */
  mu: [number, number, number];
}

// ---------------------------------------------------------------------------------------------
// Samples

const N_GRID = 36;
const LEVELS = [1e-14, 1e-11, 1e-8, 1e-6, 1e-4, 1e-3, 4e-3, 1.2e-2];
/** Basis points closer than this (in the three fractions) are one candidate phase. */
const MERGE = 2.2 / N_GRID;
const MAX_EXTRA = 64;

interface Samples {
  n: number;
  xA: Float64Array;
  xB: Float64Array;
  xC: Float64Array;
  g: Float64Array;
}

let base: { xA: Float64Array; xB: Float64Array; xC: Float64Array } | undefined;

function baseSamples() {
  if (base) return base;
  const pts: number[] = [];
  for (let i = 0; i <= N_GRID; i++) {
    for (let j = 0; i + j <= N_GRID; j++) pts.push(i / N_GRID, j / N_GRID, (N_GRID - i - j) / N_GRID);
  }
  // pairs (t, 1 - t) along an edge, each given to full precision
  const pairs: Array<[number, number]> = [];
  for (let j = 0; j <= N_GRID; j++) pairs.push([j / N_GRID, (N_GRID - j) / N_GRID]);
  for (const d of LEVELS) pairs.push([d, 1 - d], [1 - d, d]);
  for (const d of LEVELS) {
    for (const [p, q] of pairs) {
      const a = (1 - d) * p, b = (1 - d) * q;
      pts.push(d, a, b, a, d, b, a, b, d);
    }
  }
  const n = pts.length / 3;
  base = { xA: new Float64Array(n), xB: new Float64Array(n), xC: new Float64Array(n) };
  for (let k = 0; k < n; k++) {
    base.xA[k] = pts[3 * k]; base.xB[k] = pts[3 * k + 1]; base.xC[k] = pts[3 * k + 2];
  }
  return base;
}

let lastSamples: { key: string; T: number; s: Samples; ideal?: Float64Array; excess?: { key: string; g: Float64Array } } | undefined;

let lastIsotherm: { model: TernaryModel; T: number; iso: TernaryIsotherm } | undefined;

/** model.at(T), the last one remembered (a cascade splits many feeds of one model at one T). */
function isothermOf(model: TernaryModel, T: number): TernaryIsotherm {
  if (!lastIsotherm || lastIsotherm.model !== model || lastIsotherm.T !== T) lastIsotherm = { model, T, iso: model.at(T) };
  return lastIsotherm.iso;
}

/**
 * g on the samples at T (the last model and T are remembered), with room for extra points. At a
 * new T of the same model the arrays are reused and, where the model splits g into a part that
 * does not depend on T and the rest (`idealParts`, `gFromIdeal`: the same bits as `g`), only the
 * rest is evaluated anew; where g_E itself is the same as at the last T (`excessKey`), only RT.
 */
function samplesAt(model: TernaryModel, iso: TernaryIsotherm): Samples {
  const b = baseSamples(), n = b.xA.length;
  if (!lastSamples || lastSamples.key !== model.key || lastSamples.T !== iso.T) {
    let s: Samples, ideal: Float64Array | undefined, excess: { key: string; g: Float64Array } | undefined;
    if (lastSamples && lastSamples.key === model.key) {
      s = lastSamples.s; // its first n points are the base samples (extra points go after them)
      ideal = lastSamples.ideal;
      excess = lastSamples.excess;
    } else {
      const cap = n + MAX_EXTRA;
      s = { n, xA: new Float64Array(cap), xB: new Float64Array(cap), xC: new Float64Array(cap), g: new Float64Array(cap) };
      s.xA.set(b.xA); s.xB.set(b.xB); s.xC.set(b.xC);
      if (iso.idealParts && iso.gFromIdeal) {
        ideal = new Float64Array(n);
        iso.idealParts(n, b.xA, b.xB, b.xC, ideal);
      }
    }
    const eKey = iso.excessKey;
    if (ideal && eKey !== undefined && iso.excessParts) {
      // g_E the same at this T as at the last (its parameters do not depend on T): only RT changes
      if (!excess || excess.key !== eKey) {
        excess = { key: eKey, g: excess?.g ?? new Float64Array(n) };
        iso.excessParts(n, b.xA, b.xB, b.xC, excess.g);
      }
      const RT = iso.RT, e = excess.g;
      for (let k = 0; k < n; k++) s.g[k] = RT * ideal[k] + e[k];
    } else if (ideal && iso.gFromIdeal) iso.gFromIdeal(n, b.xA, b.xB, b.xC, ideal, s.g);
    else for (let k = 0; k < n; k++) s.g[k] = iso.g(b.xA[k], b.xB[k], b.xC[k]);
    lastSamples = { key: model.key, T: iso.T, s, ideal, excess };
  }
  lastSamples.s.n = n;
  return lastSamples.s;
}

function addSample(s: Samples, iso: TernaryIsotherm, p: TernaryPoint): void {
  if (s.n >= s.xA.length) return;
  const k = s.n++;
  s.xA[k] = p.xA; s.xB[k] = p.xB; s.xC[k] = p.xC;
  s.g[k] = iso.g(p.xA, p.xB, p.xC);
}

// ---------------------------------------------------------------------------------------------
// The envelope over the samples: revised simplex with a 3 x 3 basis

const M3 = new Float64Array(9), v3 = new Float64Array(3);

interface Face {
  /** Sample indices of the basis and their weights. */
  idx: number[];
  lambda: number[];
}

/** The basis of the lower envelope of the samples at z (vertices A, B, C are samples 0.. see below). */
function lowerFace(s: Samples, z: TernaryPoint, RT: number): Face {
  // the pure components are samples of the uniform grid: (i, j) = (N, 0), (0, N), (0, 0)
  const idxOf = (i: number, j: number) => {
    let k = 0;
    for (let ii = 0; ii < i; ii++) k += N_GRID + 1 - ii;
    return k + j;
  };
  const basis = [idxOf(N_GRID, 0), idxOf(0, N_GRID), idxOf(0, 0)];
  const lambda = [0, 0, 0], m = [0, 0, 0], d = [0, 0, 0];
  const X = (k: number, c: number) => (c === 0 ? s.xA[k] : c === 1 ? s.xB[k] : s.xC[k]);
  for (let iter = 0; iter < 300; iter++) {
    // lambda: sum_r lambda_r x_{basis r} = z  (X^T lambda = z)
    for (let c = 0; c < 3; c++) for (let r = 0; r < 3; r++) M3[c * 3 + r] = X(basis[r], c);
    v3[0] = z.xA; v3[1] = z.xB; v3[2] = z.xC;
    if (!solveInPlace(M3, v3, 3)) break;
    for (let r = 0; r < 3; r++) lambda[r] = Math.max(0, v3[r]);
    // the plane m: sum_c m_c x_{basis r, c} = g_{basis r}  (X m = g)
    for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) M3[r * 3 + c] = X(basis[r], c);
    for (let r = 0; r < 3; r++) v3[r] = s.g[basis[r]];
    if (!solveInPlace(M3, v3, 3)) break;
    m[0] = v3[0]; m[1] = v3[1]; m[2] = v3[2];
    // entering sample: most negative reduced cost g_k - m . x_k
    let best = -1, rBest = -1e-12 * RT;
    for (let k = 0; k < s.n; k++) {
      const r = s.g[k] - (m[0] * s.xA[k] + m[1] * s.xB[k] + m[2] * s.xC[k]);
      if (r < rBest) { rBest = r; best = k; }
    }
    if (best < 0) break;
    // direction: X^T dvec = x_best
    for (let c = 0; c < 3; c++) for (let r = 0; r < 3; r++) M3[c * 3 + r] = X(basis[r], c);
    v3[0] = s.xA[best]; v3[1] = s.xB[best]; v3[2] = s.xC[best];
    if (!solveInPlace(M3, v3, 3)) break;
    d[0] = v3[0]; d[1] = v3[1]; d[2] = v3[2];
    let leave = -1, theta = Infinity;
    for (let r = 0; r < 3; r++) {
      if (d[r] > 1e-13) {
        const t = lambda[r] / d[r];
        if (t < theta) { theta = t; leave = r; }
      }
    }
    if (leave < 0) break;
    basis[leave] = best;
  }
  return { idx: basis, lambda };
}

/** Basis points with weight, merged into candidate phases (weighted means), largest weight first. */
function candidates(s: Samples, face: Face): Array<{ p: TernaryPoint; w: number }> {
  const out: Array<{ p: TernaryPoint; w: number }> = [];
  for (let r = 0; r < 3; r++) {
    const w = face.lambda[r];
    if (!(w > 1e-13)) continue;
    const k = face.idx[r];
    const p = { xA: s.xA[k], xB: s.xB[k], xC: s.xC[k] };
    const near = out.find((o) => Math.hypot(o.p.xA - p.xA, o.p.xB - p.xB, o.p.xC - p.xC) < MERGE);
    if (near) {
      const t = near.w + w;
      near.p = { xA: (near.p.xA * near.w + p.xA * w) / t, xB: (near.p.xB * near.w + p.xB * w) / t, xC: (near.p.xC * near.w + p.xC * w) / t };
      near.w = t;
    } else out.push({ p, w });
  }
  return out.sort((a, b) => b.w - a.w);
}

// ---------------------------------------------------------------------------------------------
// Log-ratio coordinates

/** u = (ln(x_B/x_A), ln(x_C/x_A)) of a composition (zeros lifted to 1e-14 for a starting point). */
function toU(p: TernaryPoint, u: Float64Array, o: number): void {
  const a = Math.max(p.xA, 1e-14), b = Math.max(p.xB, 1e-14), c = Math.max(p.xC, 1e-14);
  u[o] = Math.log(b) - Math.log(a);
  u[o + 1] = Math.log(c) - Math.log(a);
}

/** The fractions at u (softmax of (0, u_B, u_C)): each to full relative precision. */
function fromU(uB: number, uC: number, x: Float64Array, o: number): void {
  const m = Math.max(0, uB, uC);
  const a = Math.exp(-m), b = Math.exp(uB - m), c = Math.exp(uC - m), s = a + b + c;
  x[o] = a / s; x[o + 1] = b / s; x[o + 2] = c / s;
}

const point = (x: Float64Array, o: number): TernaryPoint => ({ xA: x[o], xB: x[o + 1], xC: x[o + 2] });

// ---------------------------------------------------------------------------------------------
// Newton on the equilibrium equations

const MAX_NEWTON = 80;
const loc = new Float64Array(3 * LOCAL_SIZE);
const locOf = [0, 1, 2].map((q) => loc.subarray(LOCAL_SIZE * q, LOCAL_SIZE * (q + 1)));
const J = new Float64Array(36), r6 = new Float64Array(6), step = new Float64Array(6);
const xs = new Float64Array(9), uTry = new Float64Array(6), xTry = new Float64Array(9);

/**
 * Rows of the Jacobian of (dg/dx_B, dg/dx_C, mu_A) of phase q with respect to its (u_B, u_C),
 * times `sign` (+-1/RT: the residuals are in units of RT), added at rows r0..r0+2, columns 2q, 2q+1 of an n-column matrix.
 *   d(gB, gC)/d(xB, xC) = Hessian; d mu_A / d xB = -(xB hBB + xC hBC), d mu_A / d xC = -(xB hBC + xC hCC)
 *   dx/du = [[xB (xA + xC), -xB xC], [-xB xC, xC (xA + xB)]]
 */
function jacobianRows(q: number, x: Float64Array, L: Float64Array, sign: number, r0: number, n: number): void {
  const o = 3 * q, l = LOCAL_SIZE * q;
  const a = x[o], b = x[o + 1], c = x[o + 2];
  const hBB = L[l + HBB], hBC = L[l + HBC], hCC = L[l + HCC];
  const dBB = b * (a + c), dBC = -b * c, dCC = c * (a + b);
  // rows (d/dx_B, d/dx_C) of gB, gC and mu_A
  const mB = -(b * hBB + c * hBC), mC = -(b * hBC + c * hCC);
  J[r0 * n + 2 * q] += sign * (hBB * dBB + hBC * dBC);
  J[r0 * n + 2 * q + 1] += sign * (hBB * dBC + hBC * dCC);
  J[(r0 + 1) * n + 2 * q] += sign * (hBC * dBB + hCC * dBC);
  J[(r0 + 1) * n + 2 * q + 1] += sign * (hBC * dBC + hCC * dCC);
  J[(r0 + 2) * n + 2 * q] += sign * (mB * dBB + mC * dBC);
  J[(r0 + 2) * n + 2 * q + 1] += sign * (mB * dBC + mC * dCC);
}

/** The size of the terms of the tie-line determinant at the last residual evaluation. */
let detScale = 1;

/** Residuals of k phases (k = 2 with the tie-line condition on z, or k = 3), scaled by RT. */
function residuals(iso: TernaryIsotherm, k: number, x: Float64Array, z: TernaryPoint, out: Float64Array): number {
  for (let q = 0; q < k; q++) iso.local(x[3 * q], x[3 * q + 1], x[3 * q + 2], locOf[q]);
  const RT = iso.RT;
  let norm = 0;
  for (let q = 1; q < k; q++) {
    const l = LOCAL_SIZE * q, r0 = 3 * (q - 1);
    out[r0] = (loc[GB] - loc[l + GB]) / RT;
    out[r0 + 1] = (loc[GC] - loc[l + GC]) / RT;
    out[r0 + 2] = (loc[MUA] - loc[l + MUA]) / RT;
  }
  if (k === 2) {
    // the feed on the tie-line: det[x'; x''; z] = x' . (x'' x z) = 0, from all three fractions (no
    // 1 - others: a tie-line along an edge keeps the dilute component's balance), relative to the
    // size of its terms
    const cA = x[4] * z.xC - x[5] * z.xB, cB = x[5] * z.xA - x[3] * z.xC, cC = x[3] * z.xB - x[4] * z.xA;
    const tA = x[0] * cA, tB = x[1] * cB, tC = x[2] * cC;
    detScale = Math.abs(tA) + Math.abs(tB) + Math.abs(tC) || 1;
    out[3] = (tA + tB + tC) / detScale;
  }
  const n = 2 * k;
  for (let i = 0; i < n; i++) norm = Math.max(norm, Math.abs(out[i]));
  return norm;
}

/** Set when Newton ran a fraction below 1e-300 (not representable to full precision). */
let underflow = false;

/**
 * Newton from the starting phases; the converged phases, or undefined. With `giveUp` (a warm start,
 * whose caller has the sampled search to fall back on), a step that no halving makes lower the
 * residual ends it at once, instead of being taken and retried up to MAX_NEWTON times.
 */
function newton(iso: TernaryIsotherm, start: TernaryPoint[], z: TernaryPoint, giveUp = false): TernaryPoint[] | undefined {
  const k = start.length, n = 2 * k;
  const u = new Float64Array(n);
  start.forEach((p, q) => toU(p, u, 2 * q));
  for (let q = 0; q < k; q++) fromU(u[2 * q], u[2 * q + 1], xs, 3 * q);
  let norm = residuals(iso, k, xs, z, r6);
  let small = 0;
  for (let it = 0; it < MAX_NEWTON; it++) {
    J.fill(0, 0, n * n);
    for (let q = 1; q < k; q++) {
      jacobianRows(0, xs, loc, 1 / iso.RT, 3 * (q - 1), n);
      jacobianRows(q, xs, loc, -1 / iso.RT, 3 * (q - 1), n);
    }
    if (k === 2) {
      // d det / d x' = x'' x z, d det / d x'' = z x x' (the scale held fixed), through
      // dx/du_B = (-x_A x_B, x_B (x_A + x_C), -x_B x_C), dx/du_C = (-x_A x_C, -x_B x_C, x_C (x_A + x_B))
      const a1 = xs[0], b1 = xs[1], c1 = xs[2], a2 = xs[3], b2 = xs[4], c2 = xs[5];
      const grads = [
        [b2 * z.xC - c2 * z.xB, c2 * z.xA - a2 * z.xC, a2 * z.xB - b2 * z.xA],
        [z.xB * c1 - z.xC * b1, z.xC * a1 - z.xA * c1, z.xA * b1 - z.xB * a1],
      ];
      for (let q = 0; q < 2; q++) {
        const a = xs[3 * q], b = xs[3 * q + 1], c = xs[3 * q + 2];
        const [pA, pB, pC] = grads[q];
        J[3 * n + 2 * q] = (-pA * a * b + pB * b * (a + c) - pC * b * c) / detScale;
        J[3 * n + 2 * q + 1] = (-pA * a * c - pB * b * c + pC * c * (a + b)) / detScale;
      }
    }
    for (let i = 0; i < n; i++) step[i] = -r6[i];
    if (!solveInPlace(J, step, n)) return undefined;
    let big = 0;
    for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(step[i]));
    const cap = big > 60 ? 60 / big : 1;
    // backtracking on the largest residual
    let t = cap, accepted = false, newNorm = norm;
    for (let tries = 0; tries < 12; tries++) {
      for (let i = 0; i < n; i++) uTry[i] = u[i] + t * step[i];
      for (let q = 0; q < k; q++) fromU(uTry[2 * q], uTry[2 * q + 1], xTry, 3 * q);
      for (let i = 0; i < 3 * k; i++) if (!(xTry[i] > 1e-300)) underflow = true;
      newNorm = residuals(iso, k, xTry, z, r6);
      if (Number.isFinite(newNorm) && (newNorm < norm || newNorm < 1e-13 || (tries === 11 && !giveUp))) { accepted = Number.isFinite(newNorm); break; }
      t /= 2;
    }
    if (!accepted) return undefined;
    for (let i = 0; i < n; i++) u[i] = uTry[i];
    for (let i = 0; i < 3 * k; i++) xs[i] = xTry[i];
    norm = newNorm;
    // converged: a full step below 1e-12 in every u (relative 1e-12 in every fraction), twice
    if (t === 1 && big * t < 1e-12 && norm < 1e-9) {
      if (++small >= 2) break;
    } else if (big * t < 1e-12 && norm < 1e-11) {
      if (++small >= 2) break;
    }
    if (it === MAX_NEWTON - 1) return undefined;
  }
  if (!(norm < 1e-9)) return undefined;
  const out: TernaryPoint[] = [];
  for (let q = 0; q < k; q++) {
    const p = point(xs, 3 * q);
    if (!(p.xA > 1e-300 && p.xB > 1e-300 && p.xC > 1e-300)) {
      underflow = true;
      return undefined;
    }
    out.push(p);
  }
  // phases that coincide are no split (the trivial solution)
  for (let q = 0; q < k; q++) {
    for (let r = q + 1; r < k; r++) {
      if (distance(out[q], out[r]) < 1e-7) return undefined;
    }
  }
  return out;
}

/**
 * Whether (a, b, c) lies within r of one of the points: distance(p, q) < r, decided by the squared
 * sum (no allocation, no Math.hypot) except within a relative 1e-12 of r, where Math.hypot decides
 * as `distance` does.
 */
function nearAny(points: readonly TernaryPoint[], a: number, b: number, c: number, r: number): boolean {
  const r2 = r * r;
  for (const q of points) {
    const dA = a - q.xA, dB = b - q.xB, dC = c - q.xC, s2 = dA * dA + dB * dB + dC * dC;
    if (s2 < r2 * (1 - 1e-12)) return true;
    if (s2 <= r2 * (1 + 1e-12) && Math.hypot(dA, dB, dC) < r) return true;
  }
  return false;
}

function distance(p: TernaryPoint, q: TernaryPoint): number {
  return Math.hypot(p.xA - q.xA, p.xB - q.xB, p.xC - q.xC);
}

/** Phase fractions of z among the phases (lever rule on the tie-line, barycentric in the triangle). */
function fractionsOf(phases: TernaryPoint[], z: TernaryPoint): number[] | undefined {
  if (phases.length === 1) return [1];
  if (phases.length === 2) {
    const [p, q] = phases;
    const dA = q.xA - p.xA, dB = q.xB - p.xB, dC = q.xC - p.xC;
    const beta = ((z.xA - p.xA) * dA + (z.xB - p.xB) * dB + (z.xC - p.xC) * dC) / (dA * dA + dB * dB + dC * dC);
    return [1 - beta, beta];
  }
  for (let c = 0; c < 3; c++) {
    for (let r = 0; r < 3; r++) M3[c * 3 + r] = c === 0 ? phases[r].xA : c === 1 ? phases[r].xB : phases[r].xC;
  }
  v3[0] = z.xA; v3[1] = z.xB; v3[2] = z.xC;
  if (!solveInPlace(M3, v3, 3)) return undefined;
  return [v3[0], v3[1], v3[2]];
}

// ---------------------------------------------------------------------------------------------
// The check: the plane through the phases lies below g

const dLoc = new Float64Array(LOCAL_SIZE), dx = new Float64Array(3);
/** g and mu at the first phase of an answer (read at once into the plane m). */
const one = new Float64Array(LOCAL_SIZE);

/**
 * D(x) = g(x) - sum_i m_i x_i at its local minimum reached from p by Newton in u (a Gauss–Newton
 * Hessian dx/du^T H dx/du, a gradient step where that is not positive definite, backtracking on D).
 */
function localMinimum(iso: TernaryIsotherm, m: readonly number[], p: TernaryPoint): { p: TernaryPoint; D: number } {
  let uB = Math.log(Math.max(p.xB, 1e-300)) - Math.log(Math.max(p.xA, 1e-300));
  let uC = Math.log(Math.max(p.xC, 1e-300)) - Math.log(Math.max(p.xA, 1e-300));
  const Dat = (x: Float64Array) => iso.g(x[0], x[1], x[2]) - (m[0] * x[0] + m[1] * x[1] + m[2] * x[2]);
  fromU(uB, uC, dx, 0);
  let D = Dat(dx);
  for (let it = 0; it < 40; it++) {
    const a = dx[0], b = dx[1], c = dx[2];
    iso.local(a, b, c, dLoc);
    // dD/dxB = gB - (mB - mA), dD/dxC = gC - (mC - mA)
    const eB = dLoc[GB] - (m[1] - m[0]), eC = dLoc[GC] - (m[2] - m[0]);
    const jBB = b * (a + c), jBC = -b * c, jCC = c * (a + b);
    const gu = jBB * eB + jBC * eC, gv = jBC * eB + jCC * eC;
    const hBB = dLoc[HBB], hBC = dLoc[HBC], hCC = dLoc[HCC];
    // H_u = Jx^T H Jx
    const t11 = hBB * jBB + hBC * jBC, t12 = hBB * jBC + hBC * jCC, t21 = hBC * jBB + hCC * jBC, t22 = hBC * jBC + hCC * jCC;
    const H11 = jBB * t11 + jBC * t21, H12 = jBB * t12 + jBC * t22, H22 = jBC * t12 + jCC * t22;
    const det = H11 * H22 - H12 * H12;
    let sB: number, sC: number;
    if (H11 > 0 && det > 0) {
      sB = -(H22 * gu - H12 * gv) / det;
      sC = -(-H12 * gu + H11 * gv) / det;
    } else {
      const gn = Math.hypot(gu, gv) || 1;
      sB = -gu / gn; sC = -gv / gn;
    }
    const len = Math.hypot(sB, sC);
    if (len > 3) { sB *= 3 / len; sC *= 3 / len; }
    let t = 1, moved = false;
    for (let tries = 0; tries < 30; tries++) {
      fromU(uB + t * sB, uC + t * sC, xTry, 0);
      const Dn = Dat(xTry);
      if (Dn < D) {
        uB += t * sB; uC += t * sC; D = Dn; dx[0] = xTry[0]; dx[1] = xTry[1]; dx[2] = xTry[2]; moved = true;
        break;
      }
      t /= 2;
      // a move this short would end the search anyway (below): at the minimum, where no step
      // lowers D (rounding), stop halving here
      if (t * len < 1e-10) break;
    }
    if (!moved || t * len < 1e-10) break;
  }
  return { p: { xA: dx[0], xB: dx[1], xC: dx[2] }, D };
}

/**
 * Undefined when the plane sum_i m_i x_i lies below g (within tol) at every sample and every local
 * minimum of g minus it reached from the lowest samples away from the phases; else the composition
 * where it cuts g most.
 */
function cutOf(iso: TernaryIsotherm, s: Samples, m: readonly number[], phases: TernaryPoint[]): TernaryPoint | undefined {
  const tol = 1e-10 * (iso.RT + Math.abs(m[0]) + Math.abs(m[1]) + Math.abs(m[2]));
  const lowest: Array<{ k: number; D: number }> = [];
  let worst: { p: TernaryPoint; D: number } | undefined;
  // the arrays and the plane in locals: the loop's loads stay out of the calls it makes
  const n = s.n, gs = s.g, xA = s.xA, xB = s.xB, xC = s.xC, mA = m[0], mB = m[1], mC = m[2];
  // D of the sixth lowest kept (once six are kept)
  let sixth = Infinity;
  for (let k = 0; k < n; k++) {
    const D = gs[k] - (mA * xA[k] + mB * xB[k] + mC * xC[k]);
    if (D < -tol && (!worst || D < worst.D)) worst = { p: { xA: xA[k], xB: xB[k], xC: xC[k] }, D };
    if (!(lowest.length < 6 || D < sixth)) continue;
    if (nearAny(phases, xA[k], xB[k], xC[k], MERGE)) continue;
    {
      lowest.push({ k, D });
      lowest.sort((a, b) => a.D - b.D);
      if (lowest.length > 6) lowest.pop();
      if (lowest.length === 6) sixth = lowest[5].D;
    }
  }
  if (worst) return worst.p;
  for (const { k } of lowest) {
    const r = localMinimum(iso, m, { xA: s.xA[k], xB: s.xB[k], xC: s.xC[k] });
    if (r.D < -tol && !phases.some((q) => distance(r.p, q) < 1e-6)) return r.p;
  }
  return undefined;
}

// ---------------------------------------------------------------------------------------------

function checkTemperature(T: number): void {
  if (!Number.isFinite(T)) fail('range', 'the temperature must be a finite number of kelvin');
  if (!(T > 0)) fail('range', `the temperature must be above 0 K (got ${T} K)`);
}

/**
 * Spec order: by increasing x_C, then x_B. Values of x_C within a relative 1e-9 count as equal (the
 * solve's accuracy; a symmetric system's phases then come in the order of x_B, not of rounding).
 */
function order(phases: TernaryPoint[], fractions: number[]): { phases: TernaryPoint[]; fractions: number[] } {
  const byC = (p: TernaryPoint, q: TernaryPoint) => (Math.abs(p.xC - q.xC) <= 1e-9 * Math.max(p.xC, q.xC) ? 0 : p.xC - q.xC);
  const idx = phases.map((_, i) => i).sort((i, j) => byC(phases[i], phases[j]) || phases[i].xB - phases[j].xB);
  return { phases: idx.map((i) => phases[i]), fractions: idx.map((i) => fractions[i]) };
}

/** Phase fractions may stray below 0 by this much (a feed on a binodal or a triangle's side). */
const FRACTION_SLACK = 1e-9;

/**
 * The phases a feed (xA, xB, xC) splits into at T: the face of the lower convex envelope of g that
 * holds it. Fails with 'range' for a bad feed or T, 'convergence' when no verified answer is found.
 */
export function splitFeed(model: TernaryModel, T: number, xA: number, xB: number, xC: number): TernarySplit {
  checkTemperature(T);
  checkComposition(xA, xB, xC, 'the feed');
  // fractions that sum to 1 within 1e-9 are scaled to sum to 1 (each keeps its relative precision)
  const sum = xA + xB + xC;
  const iso = isothermOf(model, T), z: TernaryPoint = sum === 1 ? { xA, xB, xC } : { xA: xA / sum, xB: xB / sum, xC: xC / sum };
  const s = samplesAt(model, iso);
  addSample(s, iso, z);
  underflow = false;
  for (let round = 0; round < 4; round++) {
    const cands = candidates(s, lowerFace(s, z, iso.RT));
    const tries: TernaryPoint[][] = [];
    if (cands.length === 3) {
      const c = cands.map((q) => q.p);
      tries.push(c, [c[0], c[1]], [c[0], c[2]], [c[1], c[2]]);
    } else if (cands.length === 2) tries.push([cands[0].p, cands[1].p]);
    tries.push([z]);
    for (let n = 0; n < tries.length && n < 16; n++) {
      const start = tries[n];
      const phases = start.length === 1 ? [z] : newton(iso, start, z);
      if (!phases) continue;
      if (phases.length > 1) for (const p of phases) addSample(s, iso, p);
      const fractions = fractionsOf(phases, z);
      if (!fractions || fractions.some((f) => !(f >= -FRACTION_SLACK))) {
        // a three-phase triangle that does not hold z: its side nearest z starts a tie-line
        if (phases.length === 3 && fractions) {
          const keep = [0, 1, 2].filter((i) => fractions[i] > 0);
          if (keep.length === 2) tries.push([phases[keep[0]], phases[keep[1]]]);
        }
        continue;
      }
      iso.local(phases[0].xA, phases[0].xB, phases[0].xC, one);
      const m = [one[MUA], one[MUB], one[MUC]];
      const cut = cutOf(iso, s, m, phases);
      if (cut) {
        addSample(s, iso, cut);
        // the composition that undercuts the plane is a phase of a better answer: one phase more
        if (phases.length < 3) tries.push([...phases, cut]);
        // near a plait point the tie-line through a one-phase guess is short: start its other end
        // beyond the feed, opposite the undercutting composition
        if (phases.length === 1) {
          for (const t of [1, 0.3]) {
            const p = { xA: z.xA + t * (z.xA - cut.xA), xB: z.xB + t * (z.xB - cut.xB), xC: z.xC + t * (z.xC - cut.xC) };
            if (p.xA > 0 && p.xB > 0 && p.xC > 0) tries.push([p, cut]);
          }
        }
        continue;
      }
      const clipped = fractions.map((f) => Math.max(0, f));
      const sum = clipped.reduce((a, b) => a + b, 0);
      const sorted = order(phases, clipped.map((f) => f / sum));
      return { T, ...sorted, mu: [m[0], m[1], m[2]] };
    }
    for (const c of cands) addSample(s, iso, c.p);
  }
  fail('convergence', underflow
    ? msg`the phase split of the feed (${xA}, ${xB}, ${xC}) at T = ${kelvin(T)} did not converge: it appears to need a phase with less than 1e-300 of one component, below what a number can hold`
    : msg`the phase split of the feed (${xA}, ${xB}, ${xC}) at T = ${kelvin(T)} did not converge to a verified answer (a feed very near a plait point or a phase boundary can do this: move it slightly)`);
}

/**
 * Whether the tangent plane of g at p (sum_i mu_i(p) x_i) lies below g over the whole triangle,
 * checked as the split checks its answers: p is then on the lower convex envelope (stable).
 */
export function onEnvelope(model: TernaryModel, T: number, p: TernaryPoint): boolean {
  const iso = model.at(T), s = samplesAt(model, iso);
  iso.local(p.xA, p.xB, p.xC, one);
  return cutOf(iso, s, [one[MUA], one[MUB], one[MUC]], [p]) === undefined;
}

/**
 * A split of z started from given phases (a warm start: the tie-line of a nearby feed, as a
 * cascade's stages give from one sweep to the next): Newton from `start` only, without the
 * sampled envelope. With `verify`, the answer must also pass splitFeed's tangent-plane check.
 * Undefined when Newton fails, the feed does not lie between the phases, or (with `verify`) a
 * composition lies below the plane: the caller then asks splitFeed. Converged phases are the same
 * root splitFeed's Newton finds (to the last bits, not necessarily bit for bit).
 */
export function splitFrom(model: TernaryModel, T: number, z: TernaryPoint, start: readonly TernaryPoint[], verify: boolean): TernarySplit | undefined {
  checkTemperature(T);
  const sum = z.xA + z.xB + z.xC;
  const feed = sum === 1 ? z : { xA: z.xA / sum, xB: z.xB / sum, xC: z.xC / sum };
  const iso = isothermOf(model, T);
  const phases = newton(iso, [...start], feed, true);
  if (!phases) return undefined;
  const fractions = fractionsOf(phases, feed);
  if (!fractions || fractions.some((f) => !(f >= -FRACTION_SLACK))) return undefined;
  iso.local(phases[0].xA, phases[0].xB, phases[0].xC, one);
  const m = [one[MUA], one[MUB], one[MUC]];
  if (verify && cutOf(iso, samplesAt(model, iso), m, phases)) return undefined;
  const clipped = fractions.map((f) => Math.max(0, f));
  const total = clipped.reduce((a, b) => a + b, 0);
  return { T, ...order(phases, clipped.map((f) => f / total)), mu: [m[0], m[1], m[2]] };
}
