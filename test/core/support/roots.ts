/** Plain bisection, the tests' own root finder (nothing from src/). f(lo) and f(hi) must differ in sign. */
export function bisect(f: (t: number) => number, lo: number, hi: number): number {
  let flo = f(lo);
  if (!(flo < 0 !== f(hi) < 0)) throw new Error(`no sign change on [${lo}, ${hi}]`);
  for (let i = 0; i < 400; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    const fm = f(mid);
    if (fm < 0 === flo < 0) { lo = mid; flo = fm; } else hi = mid;
  }
  return 0.5 * (lo + hi);
}
