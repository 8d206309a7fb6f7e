/** Small root finders and minimisers over one variable, shared by the solvers. */
import { CELL, CELL_GUARD } from './limits';

/**
 * Brent's method (zeroin) for f(t) = 0 on [a, b] with f(a), f(b) of opposite signs (or one zero).
 * Converges to |b - a| <= 2 eps |b| + tol. Returns NaN if the bracket is not a bracket.
 */
export function brentRoot(f: (t: number) => number, a: number, b: number, fa: number, fb: number, tol = 0): number {
  if (fa === 0) return a;
  if (fb === 0) return b;
  if ((fa > 0) === (fb > 0)) return NaN;
  let c = a, fc = fa, d = b - a, e = d;
  for (let iter = 0; iter < 200; iter++) {
    if ((fb > 0) === (fc > 0)) { c = a; fc = fa; d = b - a; e = d; }
    if (Math.abs(fc) < Math.abs(fb)) { a = b; b = c; c = a; fa = fb; fb = fc; fc = fa; }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number, q: number;
      if (a === c) { p = 2 * xm * s; q = 1 - s; }
      else {
        const qq = fa / fc, r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q; else p = -p;
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) { e = d; d = p / q; }
      else { d = xm; e = d; }
    } else { d = xm; e = d; }
    a = b; fa = fb;
    b += Math.abs(d) > tol1 ? d : (xm > 0 ? tol1 : -tol1);
    fb = f(b);
  }
  return b;
}

/**
 * Minimum of f on [a, b] by golden-section search with parabolic steps (Brent's fmin).
 * Returns the abscissa; tolerance relative 1e-10 plus `tol`.
 */
export function brentMin(f: (t: number) => number, a: number, b: number, tol = 1e-12): { t: number; f: number } {
  const golden = 0.3819660112501051;
  let v = a + golden * (b - a), w = v, x = v;
  let fx = f(x), fv = fx, fw = fx;
  let d = 0, e = 0;
  for (let iter = 0; iter < 200; iter++) {
    const xm = 0.5 * (a + b);
    const tol1 = 1e-10 * Math.abs(x) + tol, tol2 = 2 * tol1;
    if (Math.abs(x - xm) <= tol2 - 0.5 * (b - a)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      let r = (x - w) * (fx - fv), q = (x - v) * (fx - fw), p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p; else q = -q;
      const etemp = e;
      e = d;
      if (!(Math.abs(p) >= Math.abs(0.5 * q * etemp) || p <= q * (a - x) || p >= q * (b - x))) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = xm - x >= 0 ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) { e = x >= xm ? a - x : b - x; d = golden * e; }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
    const fu = f(u);
    if (fu <= fx) {
      if (u >= x) a = x; else b = x;
      v = w; fv = fw; w = x; fw = fx; x = u; fx = fu;
    } else {
      if (u < x) a = u; else b = u;
      if (fu <= fw || w === x) { v = w; fv = fw; w = u; fw = fu; }
      else if (fu <= fv || v === x || v === w) { v = u; fv = fu; }
    }
  }
  return { t: x, f: fx };
}

/**
 * Canonical final solves: a root of F (increasing through it, up to rounding) with the same bits
 * from any estimate near it. Both rules below solve in a cell [i CELL, (i + 1) CELL] of u
 * (limits.ts) that depends on the root alone, by Newton's method from a start that depends on the
 * cell alone, until a step is below NEWTON_STEP max(1, |t|) (the error is then below 1e-20). Each
 * function solved this way has its own copy of its rule beside it, calling it directly: V8 then
 * inlines the function into the loop, while one shared copy called with three functions inlined
 * none of them and boxed every number passed. Change all copies of a rule together;
 * test/core/canonical.test.ts and the fixed-results record check their bits.
 *
 * 1. Sign cells (curvature.ts: q = 0, where F is cheap). The rule, which every copy follows
 * operation for operation:
 *
 * signCell<F>(estimate, out): the cell in which F changes sign, walked to from the cell of an
 * estimate. The signs at cell ends are computed from the ends alone, so the cell is the same from
 * any estimate close enough to the root; undefined if the walk does not end within 16 cells (an
 * estimate too far off) or F is not a number or not increasing there. The cell is written into
 * `out` (no allocation).
 *
 * cellNewton<F>(cell, out): Newton's method for F = 0 inside a sign cell, started at the secant
 * point of its ends and kept inside it (bisection when a step leaves it). F returns its value and
 * writes its slope into out[0]. From the secant point of a 1e-6 cell the error is of order 1e-12,
 * so one step usually ends it.
 *
 * 2. Guarded cells (binodal.ts: g' = m and the common tangent in two unknowns, a cell for each;
 * there an evaluation of F is costly, the tangent's nesting a whole solve). The root's cell is the
 * cell that holds it, except that a root within CELL_GUARD of a cell boundary b is placed by the
 * sign of F(b) alone (F(b) < 0: above b). From any value r within ROOT_NOISE of the root that cell
 * is r's own when r is at least CELL_GUARD from both its ends (clearCell), else the side F(b) gives
 * for the boundary b next to r: the same cell from every such r (if r is clear of b, the root lies
 * on r's side farther than CELL_GUARD - ROOT_NOISE, where F(b) has the true sign; if not, every
 * r tests the same b). So no sign is evaluated unless r falls near a boundary (1 time in 16).
 *
 * newton<F>(i): Newton's method from the midpoint of cell i (usually two evaluations); it also
 * bounds the error the rounding of F allows at the root (ROUNDING of the sizes of F's terms over F').
 *
 * canonical<F>(estimate): r = newton(cell of the estimate); the root's cell from r as above; if it
 * is another cell, r = newton(that cell), whose root's cell must then be that cell. The result is
 * r, accepted only when the bound at r is below ROOT_NOISE, F' > 0 and the cell is inside the
 * branch sought, else undefined (the caller then solves without it, from scratch). Every check
 * that decides the answer is made on the final cell's solve, the same on every path; an estimate
 * only chooses where the work starts (a poor one costs a second solve).
 */
export interface SignCell {
  a: number;
  b: number;
  fa: number;
  fb: number;
}

/**
 * clearCell(r): the index i of r's cell [i CELL, (i + 1) CELL] when r is at least CELL_GUARD from
 * both its ends; NaN when it is not (the caller then tests the sign at the boundary
 * Math.round(r / CELL) CELL).
 */
export function clearCell(r: number): number {
  const ib = Math.round(r / CELL);
  return Math.abs(r - ib * CELL) < CELL_GUARD ? NaN : Math.floor(r / CELL);
}

/**
 * The root's cell next to the boundary ib CELL from the sign of F there (rule 2 above): F(b) < 0
 * puts the root above b (cell ib), F(b) >= 0 below it (cell ib - 1); NaN when F(b) is not a number.
 */
export function cellBeside(ib: number, fb: number): number {
  return fb < 0 ? ib : fb >= 0 ? ib - 1 : NaN;
}
