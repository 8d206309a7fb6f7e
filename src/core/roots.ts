/** Small root finders and minimisers over one variable, shared by the solvers. */

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
 * A cell [a, b] = [i CELL, (i + 1) CELL] of the CELL grid with f(a) < 0 <= f(b), and those values:
 * where a canonical final solve ends. The rule, which every copy follows operation for operation:
 *
 * signCell<F>(estimate, out): the cell in which F (increasing up to rounding) changes sign, walked
 * to from the cell of an estimate. The signs at cell ends are computed from the ends alone, so
 * the cell is the same from any estimate close enough to the root; undefined if the walk does not
 * end within 16 cells (an estimate too far off) or F is not a number or not increasing there. The
 * cell is written into `out` (no allocation).
 *
 * cellNewton<F>(cell, out): Newton's method for F = 0 inside a sign cell, started at the secant
 * point of its ends and kept inside it (bisection when a step leaves it): the result depends on
 * the cell alone. F returns its value and writes its slope into out[0]. From the secant point of
 * a 1e-6 cell the error is of order 1e-12, so one step usually ends it; after a step below
 * NEWTON_STEP the error is below 1e-20.
 *
 * Each function solved this way (binodal.ts: g' = m and the common tangent; curvature.ts: q = 0)
 * has its own copy of the two beside it, calling it directly: V8 then inlines the function into
 * the loop, while one shared copy called with three functions inlined none of them and boxed every
 * number passed (a sweep of a gap table took about 7 % longer). Change all copies together;
 * test/core/canonical.test.ts and the fixed-results record check their bits.
 */
export interface SignCell {
  a: number;
  b: number;
  fa: number;
  fb: number;
}
