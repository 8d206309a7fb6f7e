/**
 * Plait points at fixed T: critical points on a two-phase region's binodal, where the two
 * coexisting phases become identical. There (Gibbs' conditions, in the independent variables
 * (x_B, x_C) and with H the Hessian of g)
 *   L = det H = 0   and   M = dL/dt along the null direction v of H = 0,
 * i.e. the spinodal touches the binodal. We solve the scaled pair
 *   L~ = x_A x_B x_C det H / (RT)^2     (1 for an ideal solution),
 *   M~ = dL~/dt along the unit eigenvector v of the smaller eigenvalue of H
 * (the factor x_A x_B x_C leaves the zero set on L = 0 unchanged; M~ by central differences of
 * the analytic Hessian, step 1e-5 of the smallest fraction): candidates are the cells of a
 * triangular grid where both change sign, refined by Newton in log-ratio coordinates, kept when
 * Newton converges and the point is stable (its tangent plane lies below g: a critical point
 * inside another phase region is no plait point).
 */
import { fail } from '../errors';
import { solveInPlace } from './linear';
import { HBB, HBC, HCC, LOCAL_SIZE, type TernaryIsotherm, type TernaryModel } from './model';
import { onEnvelope, type TernaryPoint } from './split';

const loc = new Float64Array(LOCAL_SIZE);

/** L~ at (xA, xB, xC). */
function scaledDet(iso: TernaryIsotherm, a: number, b: number, c: number): number {
  iso.local(a, b, c, loc);
  return (a * b * c * (loc[HBB] * loc[HCC] - loc[HBC] * loc[HBC])) / (iso.RT * iso.RT);
}

const LM = new Float64Array(2);

/** L~ and M~ at (a, b, c) into LM; false where the step leaves the triangle. */
function conditions(iso: TernaryIsotherm, a: number, b: number, c: number): boolean {
  iso.local(a, b, c, loc);
  const hBB = loc[HBB], hBC = loc[HBC], hCC = loc[HCC];
  LM[0] = (a * b * c * (hBB * hCC - hBC * hBC)) / (iso.RT * iso.RT);
  // eigenvector of the smaller eigenvalue, oriented with v_B >= 0
  const lam = 0.5 * (hBB + hCC) - Math.hypot(0.5 * (hBB - hCC), hBC);
  let vB: number, vC: number;
  if (Math.abs(hBB - lam) > Math.abs(hCC - lam)) { vB = -hBC; vC = hBB - lam; } else { vB = hCC - lam; vC = -hBC; }
  const n = Math.hypot(vB, vC);
  if (!(n > 0)) { vB = 1; vC = 0; } else { vB /= n; vC /= n; }
  if (vB < 0 || (vB === 0 && vC < 0)) { vB = -vB; vC = -vC; }
  const h = 1e-5 * Math.min(a, b, c);
  const dA = -(vB + vC) * h, dB = vB * h, dC = vC * h;
  if (!(a - Math.abs(dA) > 0 && b - Math.abs(dB) > 0 && c - Math.abs(dC) > 0)) return false;
  LM[1] = (scaledDet(iso, a + dA, b + dB, c + dC) - scaledDet(iso, a - dA, b - dB, c - dC)) / (2 * h);
  return Number.isFinite(LM[0]) && Number.isFinite(LM[1]);
}

function fromU(uB: number, uC: number): TernaryPoint {
  const m = Math.max(0, uB, uC);
  const a = Math.exp(-m), b = Math.exp(uB - m), c = Math.exp(uC - m), s = a + b + c;
  return { xA: a / s, xB: b / s, xC: c / s };
}

const J = new Float64Array(4), r = new Float64Array(2);

/** Newton on (L~, M~) = 0 in u = (ln(x_B/x_A), ln(x_C/x_A)), Jacobian by central differences. */
function refine(iso: TernaryIsotherm, start: TernaryPoint): TernaryPoint | undefined {
  let uB = Math.log(start.xB / start.xA), uC = Math.log(start.xC / start.xA);
  for (let it = 0; it < 50; it++) {
    const p = fromU(uB, uC);
    if (!conditions(iso, p.xA, p.xB, p.xC)) return undefined;
    const L0 = LM[0], M0 = LM[1];
    const e = 1e-6;
    for (let k = 0; k < 2; k++) {
      const pp = fromU(uB + (k === 0 ? e : 0), uC + (k === 1 ? e : 0));
      const pm = fromU(uB - (k === 0 ? e : 0), uC - (k === 1 ? e : 0));
      if (!conditions(iso, pp.xA, pp.xB, pp.xC)) return undefined;
      const Lp = LM[0], Mp = LM[1];
      if (!conditions(iso, pm.xA, pm.xB, pm.xC)) return undefined;
      J[k] = (Lp - LM[0]) / (2 * e);
      J[2 + k] = (Mp - LM[1]) / (2 * e);
    }
    r[0] = -L0; r[1] = -M0;
    if (!solveInPlace(J, r, 2)) return undefined;
    let sB = r[0], sC = r[1];
    const len = Math.hypot(sB, sC);
    if (len > 1) { sB /= len; sC /= len; }
    uB += sB; uC += sC;
    if (len < 1e-10) {
      const q = fromU(uB, uC);
      return q.xA > 0 && q.xB > 0 && q.xC > 0 ? q : undefined;
    }
  }
  return undefined;
}

const N = 48;

/**
 * Every plait point at T, in the spec's phase order (increasing x_C, then x_B); an empty list when
 * there is none. Grid resolution: a plait point closer than about 1/48 to an edge, or two plait
 * points closer than that to each other, may be missed.
 */
export function plaitPoints(model: TernaryModel, T: number): TernaryPoint[] {
  if (!(Number.isFinite(T) && T > 0)) fail('range', `the temperature must be above 0 K (got ${T} K)`);
  const iso = model.at(T);
  // L~, M~ on the interior nodes (i, j) with x_A = i/N, x_B = j/N
  const idx = (i: number, j: number) => i * (N + 1) + j;
  const Lg = new Float64Array((N + 1) * (N + 1)).fill(NaN), Mg = new Float64Array((N + 1) * (N + 1)).fill(NaN);
  for (let i = 1; i < N; i++) {
    for (let j = 1; i + j < N; j++) {
      if (conditions(iso, i / N, j / N, (N - i - j) / N)) { Lg[idx(i, j)] = LM[0]; Mg[idx(i, j)] = LM[1]; }
    }
  }
  const changes = (v: Float64Array, ks: number[]) => {
    let neg = false, pos = false;
    for (const k of ks) { if (v[k] < 0) neg = true; else if (v[k] > 0) pos = true; else if (v[k] === 0) neg = pos = true; }
    return neg && pos;
  };
  const found: TernaryPoint[] = [];
  for (let i = 1; i < N; i++) {
    for (let j = 1; i + j < N; j++) {
      // the two triangles of the cell at (i, j)
      const tris = [[idx(i, j), idx(i + 1, j), idx(i, j + 1)], [idx(i + 1, j), idx(i, j + 1), idx(i + 1, j + 1)]];
      for (const [t, ks] of tris.entries()) {
        if (ks.some((k) => Number.isNaN(Lg[k]))) continue;
        if (!changes(Lg, ks) || !changes(Mg, ks)) continue;
        const a = (i + (t === 0 ? 1 / 3 : 2 / 3)) / N, b = (j + (t === 0 ? 1 / 3 : 2 / 3)) / N;
        const p = refine(iso, { xA: a, xB: b, xC: 1 - a - b });
        if (!p || found.some((q) => Math.hypot(q.xA - p.xA, q.xB - p.xB, q.xC - p.xC) < 1e-6)) continue;
        if (onEnvelope(model, T, p)) found.push(p);
      }
    }
  }
  return found.sort((p, q) => p.xC - q.xC || p.xB - q.xB);
}

/**
 * The plait point Newton reaches from `start` (as `plaitPoints` refines its grid candidates), kept
 * only when stable; undefined otherwise. For a caller that already stands near one (the end of a
 * traced binodal branch).
 */
export function plaitPointNear(model: TernaryModel, T: number, start: TernaryPoint): TernaryPoint | undefined {
  const p = refine(model.at(T), start);
  return p && onEnvelope(model, T, p) ? p : undefined;
}
