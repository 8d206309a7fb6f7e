/**
 * The fused evaluations `Isotherm.derivatives(x, y, out)` (g, g', g'' at once, used in the solvers'
 * inner loops), `curvatures` (g'', g''') and the batch `curvatureEach` (x y g''/RT) must give
 * exactly the bits of `g`, `dg`, `d2g`, `d3g` and x y d2g / RT: the solvers' canonical final
 * solves, and so every result, depend on it (the bits are our own contract, no outside source;
 * the values themselves are checked against mathjs symbolic derivatives in the other model tests).
 * Seeded random compositions over the whole range, both dilute ends included.
 */
import { describe, expect, it } from 'vitest';
import type { BinaryModel } from '../../../src/core/model';
import { splitRatio } from '../../../src/core/model';
import { floryHuggins } from '../../../src/core/models/floryHuggins';
import { nrtl } from '../../../src/core/models/nrtl';
import { redlichKister } from '../../../src/core/models/redlichKister';

/** mulberry32 (T. Ettinger, public domain, 2017): a seeded uniform in [0, 1). */
function uniform(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

// Invented parameters, one system per model, temperature-dependent where the model allows it.
const models: Array<[string, BinaryModel]> = [
  ['Redlich–Kister, 3 terms with b and c', redlichKister([{ a: 21000, b: -4, c: 0.3 }, { a: 3000, b: 1, c: 0 }, { a: -1500, b: 0, c: 0 }])],
  ['Flory–Huggins, NA = 1, NB = 1000', floryHuggins({ NA: 1, NB: 1000, A: 0.1, B: 200 })],
  ['NRTL', nrtl({ a12: -1.2, b12: 1150, a21: 0.8, b21: 520, alpha: 0.25 })],
];

describe('derivatives, curvatures and curvatureEach give the bits of g, dg, d2g and d3g (seed 4242)', () => {
  for (const [name, model] of models) {
    it(name, () => {
      const next = uniform(4242);
      const out = new Float64Array(3);
      const xy = new Float64Array(2);
      const xs = new Float64Array(500), ys = new Float64Array(500), batch = new Float64Array(500);
      let checked = 0;
      for (const T of [250, 313.15, 800, 1500]) {
        const iso = model.at(T);
        for (let i = 0; i < 500; i++) {
          splitRatio(-700 + 1400 * next(), xy); // u = ln(x/y) over the whole solved range
          const [x, y] = xy;
          iso.derivatives(x, y, out);
          expect(Object.is(out[0], iso.g(x, y)), `g at x = ${x}, T = ${T}`).toBe(true);
          expect(Object.is(out[1], iso.dg(x, y)), `g' at x = ${x}, T = ${T}`).toBe(true);
          expect(Object.is(out[2], iso.d2g(x, y)), `g'' at x = ${x}, T = ${T}`).toBe(true);
          iso.curvatures(x, y, out);
          expect(Object.is(out[0], iso.d2g(x, y)), `curvatures: g'' at x = ${x}, T = ${T}`).toBe(true);
          expect(Object.is(out[1], iso.d3g(x, y)), `curvatures: g''' at x = ${x}, T = ${T}`).toBe(true);
          xs[i] = x; ys[i] = y;
          checked++;
        }
        // the batch, over the same points
        iso.curvatureEach(xs, ys, 0, 500, batch);
        for (let i = 0; i < 500; i++) {
          expect(Object.is(batch[i], (xs[i] * ys[i] * iso.d2g(xs[i], ys[i])) / iso.RT), `curvatureEach: x y g''/RT at x = ${xs[i]}, T = ${T}`).toBe(true);
        }
      }
      expect(checked).toBe(2000);
    });
  }
});

/**
 * `dgRatio(u, x, y)` (g' with RT ln(x/y) taken as RT u, for continueMap's near-critical bound) is
 * the same quantity as dg: within 1e-13 of the sizes of g''s terms, RT (2 + |u|) + |excess part|
 * (tolerance: both are rounded sums of terms of that size, about 1e-16 each; 1e-13 leaves room for
 * the rounding of x and y themselves, whose logarithms dg takes, far below the 2^-30 margin
 * continueMap allows for it).
 */
describe('dgRatio(u, x, y) agrees with dg (seed 4243)', () => {
  for (const [name, model] of models) {
    it(name, () => {
      const next = uniform(4243);
      const xy = new Float64Array(2);
      for (const T of [250, 313.15, 800, 1500]) {
        const iso = model.at(T);
        for (let i = 0; i < 500; i++) {
          const u = -60 + 120 * next();
          splitRatio(u, xy);
          const [x, y] = xy;
          const exact = iso.dg(x, y), fast = iso.dgRatio(u, x, y);
          const size = iso.RT * (2 + Math.abs(u)) + Math.abs(exact - iso.RT * u);
          expect(Math.abs(fast - exact), `u = ${u}, T = ${T}`).toBeLessThanOrEqual(1e-13 * size);
        }
      }
    });
  }
});

/**
 * `curvatureCeiling(xa, ya, xb, yb)` bounds q = x y g''/RT, as curvatureEach computes it, from above
 * over the whole stretch between the two compositions (stableIslandBetween trusts a negative bound
 * instead of sampling). Checked against curvatureEach at 400 points of each stretch and at its
 * ends, for seeded random Redlich–Kister systems of 1 to 6 terms (a, b, c parts) and Flory–Huggins
 * systems, over stretches anywhere in the solved range. It must also be close to the true maximum
 * where it matters, or it would settle nothing: for a regular solution, q = 1 - 2 Omega x y / RT is
 * convex in d = y - x, and the bound (Bernstein's convex hull; Farin, Curves and Surfaces for
 * CAGD, 5th ed., 2002, the convex-hull property) is the larger end value plus its allowance
 * (2^-36 8^m of the coefficients' size, 8^3 2^-36 (1 + ...) < 1e-6 here).
 */
describe('curvatureCeiling bounds curvatureEach from above (seed 4244)', () => {
  const next = uniform(4244);
  const pick = (lo: number, hi: number) => lo + (hi - lo) * next();
  const systems: Array<[string, BinaryModel]> = [];
  for (let s = 0; s < 40; s++) {
    const n = 1 + (s % 6);
    const terms = Array.from({ length: n }, (_, k) => ({ a: pick(-30000, 40000) / (k + 1), b: s % 3 === 0 ? pick(-8, 8) : 0, c: s % 4 === 0 ? pick(-1, 1) : 0 }));
    systems.push([`Redlich–Kister ${n} terms #${s}`, redlichKister(terms)]);
  }
  for (let s = 0; s < 10; s++) systems.push([`Flory–Huggins #${s}`, floryHuggins({ NA: 1 + 500 * next(), NB: 1 + 50 * next(), A: pick(-0.5, 0.5), B: pick(0, 800) })]);

  it('over random stretches of random systems', () => {
    const xy = new Float64Array(2);
    const xs = new Float64Array(402), ys = new Float64Array(402), q = new Float64Array(402);
    let bounded = 0, negative = 0;
    for (const [name, model] of systems) {
      for (const T of [20, 300, 700, 1400]) { // 20 K: |q| in the hundreds
        const iso = model.at(T);
        for (let trial = 0; trial < 20; trial++) {
          const ua = trial % 2 ? pick(-8, 8) : pick(-40, 40), ub = ua + pick(0, trial % 2 ? 6 : 40);
          for (let i = 0; i <= 401; i++) {
            splitRatio(ua + ((ub - ua) * i) / 401, xy);
            xs[i] = xy[0]; ys[i] = xy[1];
          }
          iso.curvatureEach(xs, ys, 0, 402, q);
          let top = -Infinity;
          for (let i = 0; i <= 401; i++) top = Math.max(top, q[i]);
          const ceiling = iso.curvatureCeiling(xs[0], ys[0], xs[401], ys[401]);
          if (ceiling === Infinity) continue;
          expect(ceiling, `${name}, T = ${T}, u from ${ua} to ${ub}`).toBeGreaterThanOrEqual(top);
          bounded++;
          if (ceiling < 0) negative++;
        }
      }
    }
    // every Redlich–Kister stretch is bounded (at most 8 coefficients here), and some are settled
    expect(bounded).toBeGreaterThanOrEqual(40 * 4 * 20);
    expect(negative).toBeGreaterThan(50);
  });

  it('on one stretch at many temperatures in a row (as a sweep asks: the stretch\'s coefficients are kept)', () => {
    const xy = new Float64Array(2);
    const xs = new Float64Array(202), ys = new Float64Array(202), q = new Float64Array(202);
    let negative = 0;
    for (const [name, model] of systems) {
      for (let trial = 0; trial < 5; trial++) {
        const ua = pick(-6, 6), ub = ua + pick(0, 5);
        for (let i = 0; i <= 201; i++) {
          splitRatio(ua + ((ub - ua) * i) / 201, xy);
          xs[i] = xy[0]; ys[i] = xy[1];
        }
        for (let T = 200; T <= 2000; T += 150) {
          const iso = model.at(T);
          iso.curvatureEach(xs, ys, 0, 202, q);
          const ceiling = iso.curvatureCeiling(xs[0], ys[0], xs[201], ys[201]);
          for (let i = 0; i <= 201; i++) expect(ceiling, `${name}, T = ${T}, u from ${ua} to ${ub}, point ${i}`).toBeGreaterThanOrEqual(q[i]);
          if (ceiling < 0) negative++;
        }
      }
    }
    expect(negative).toBeGreaterThan(50);
  });

  it('is the larger end value for a regular solution (to within its allowance)', () => {
    const iso = redlichKister([{ a: 25000, b: 0, c: 0 }]).at(900);
    const xy = new Float64Array(2), xs = new Float64Array(2), ys = new Float64Array(2), q = new Float64Array(2);
    for (const [ua, ub] of [[-1.5, 0.2], [-0.3, 1.1], [0.4, 0.9], [-2, 2]]) {
      splitRatio(ua, xy); xs[0] = xy[0]; ys[0] = xy[1];
      splitRatio(ub, xy); xs[1] = xy[0]; ys[1] = xy[1];
      iso.curvatureEach(xs, ys, 0, 2, q);
      const ceiling = iso.curvatureCeiling(xs[0], ys[0], xs[1], ys[1]);
      expect(ceiling).toBeGreaterThanOrEqual(Math.max(q[0], q[1]));
      expect(ceiling - Math.max(q[0], q[1])).toBeLessThan(1e-6);
    }
  });
});
