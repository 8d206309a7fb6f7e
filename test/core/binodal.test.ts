/**
 * phaseMap: binodal and spinodal against closed forms, against an independent convex hull of g,
 * and invariants of the common-tangent construction over many random Redlich–Kister systems.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { phaseMap, type Gap, type PhaseMap } from '../../src/core/binodal';
import { MixgapError } from '../../src/core/errors';
import { leverFractions } from '../../src/core/leverRule';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { nrtl } from '../../src/core/models/nrtl';
import { redlichKister, regularSolution } from '../../src/core/models/redlichKister';
import type { BinaryModel } from '../../src/core/model';
import { failureReason } from './support/compare';
import { regularBinodal, regularSpinodal } from './support/closedForms';
import { hullGaps, logit, refineTangent } from './support/hull';
import {
  R_SPEC, fhG, fhText, nrtlG, nrtlText, rkD2g, rkDg, rkG, rkL, rkText,
  type FhParams, type NrtlParams, type RkTerm,
} from './support/spec';
import { reference, type Reference } from './support/symbolic';

const EPS = Number.EPSILON;

describe('regular solution: closed-form binodal and spinodal', () => {
  // Hillert, Phase Equilibria, Phase Diagrams and Phase Transformations, 2nd ed. (2008): regular-solution
  // binodal ln[x/(1-x)] = Omega(2x-1)/(RT) and spinodal x(1-x) = RT/(2 Omega)
  // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: the same
  const cases: Array<[number, number]> = [
    [20000, 600], [20000, 1000], [15000, 300], [40000, 1500], [8000, 450],
  ];
  for (const [omega, T] of cases) {
    it(`Omega = ${omega} J/mol at ${T} K`, () => {
      const map = phaseMap(regularSolution(omega).at(T));
      const want = regularBinodal(omega, T);
      expect(map.gaps).toHaveLength(1);
      const [gap] = map.gaps;
      // The reference is exact to ~1e-30; the boundary is well conditioned away from Tc (T <= 0.9 Tc
      // here), so the core's answer is limited by double rounding of u: 1e-12 relative leaves margin.
      expect(Math.abs(gap.low.x - want.x) / want.x).toBeLessThan(1e-12);
      // symmetry: x'' = 1 - x', seen through y'' with full precision
      expect(Math.abs(gap.high.y - want.x) / want.x).toBeLessThan(1e-12);
      const s = regularSpinodal(omega, T);
      expect(map.spinodal).toHaveLength(2);
      // q = x y g''/RT = 1 - 2 a x y (a = Omega/RT) has slope dq/du = -2 a x y (y - x), of order 1 at
      // the spinodal away from Tc: a simple root, located to rounding; 1e-12 relative leaves margin.
      expect(Math.abs(map.spinodal[0].x - s) / s).toBeLessThan(1e-12);
      expect(Math.abs(map.spinodal[1].y - s) / s).toBeLessThan(1e-12);
    });
  }

  it('Omega = 60000 J/mol at 300 K: boundaries near 4e-11 to better than 1e-8 relative', () => {
    const map = phaseMap(regularSolution(60000).at(300));
    const want = regularBinodal(60000, 300);
    expect(want.x).toBeGreaterThan(1e-11);
    expect(want.x).toBeLessThan(1e-10);
    expect(map.gaps).toHaveLength(1);
    // the accuracy required of this dilute case (the stricter 1e-12 checks follow below)
    expect(Math.abs(map.gaps[0].low.x - want.x) / want.x).toBeLessThan(1e-8);
    expect(Math.abs(map.gaps[0].high.y - want.x) / want.x).toBeLessThan(1e-8);
  });

  // Omega/RT = a gives x' ~ e^-a: 28 -> 7e-13, 40 -> 4e-18, 100 -> 4e-44, 300 -> 5e-131,
  // 400 -> 2e-174, 600 -> 3e-261 (all above 1e-300, representable as normal doubles).
  for (const a of [28, 40, 100, 300, 400, 600]) {
    it(`very dilute boundaries: Omega/RT = ${a}`, () => {
      const T = 500, omega = a * R_SPEC * T;
      const want = regularBinodal(omega, T);
      const map = phaseMap(regularSolution(omega).at(T));
      expect(map.gaps).toHaveLength(1);
      // relative error in x equals the absolute error in u (dx/x = y du); u ~ -a inherits the
      // rounding of a = Omega/RT in the core (eps a: 1.3e-13 at a = 600), so 1e-12 relative leaves
      // a margin of 8 at the largest a
      expect(Math.abs(map.gaps[0].low.x - want.x) / want.x).toBeLessThan(1e-12);
      expect(Math.abs(map.gaps[0].high.y - want.x) / want.x).toBeLessThan(1e-12);
    });
  }

  it('a boundary below the smallest double (Omega/RT = 800, x\' ~ e^-800) is reported as out of range', () => {
    // x' = e^-800 ~ 1e-348 cannot be represented: the core's failure reasons (errors.ts) call that 'range'
    const T = 500;
    expect(failureReason(() => phaseMap(regularSolution(800 * R_SPEC * T).at(T)))).toBe('range');
  });

  describe('near the critical temperature', () => {
    const omega = 20000, Tc = omega / (2 * R_SPEC);
    // Porter, Easterling & Sherif (2009) ch. 1 / Hillert (2008): the gap exists for every T < Tc.
    for (const delta of [1e-2, 1e-4, 1e-6, 1e-7, 1e-8, 1e-9, 1e-10, 1e-11, 1e-12]) {
      it(`T = Tc (1 - ${delta})`, () => {
        const T = Tc * (1 - delta);
        const want = regularBinodal(omega, T);
        let map: PhaseMap | undefined;
        const reason = failureReason(() => { map = phaseMap(regularSolution(omega).at(T)); });
        expect(reason, 'phaseMap just below Tc').toBe('no error');
        expect(map!.gaps).toHaveLength(1);
        const gap = map!.gaps[0];
        expect(gap.low.x).toBeLessThan(0.5);
        expect(gap.high.x).toBeGreaterThan(0.5);
        // Tolerance from the conditioning of the spec's equal-chemical-potential conditions in
        // doubles: mu_A is a sum of terms of size RT rounded at eps RT; dF/dm = x'' - x' turns that
        // into a tangent-slope error eps RT / (x'' - x'), which moves x' by that over g''(x'). With a
        // factor 100 for the several roundings involved (when the bound exceeds the gap, only the
        // existence of the gap is checked).
        const w = 1 - 2 * want.x, RT = R_SPEC * T;
        const g2 = RT / (want.x * (1 - want.x)) - 2 * omega;
        const tol = (100 * EPS * RT) / (w * g2);
        expect(Math.abs(gap.low.x - want.x), `x' (tolerance ${tol.toExponential(2)})`).toBeLessThanOrEqual(tol);
        expect(Math.abs(gap.high.x - (1 - want.x)), `x'' (tolerance ${tol.toExponential(2)})`).toBeLessThanOrEqual(tol);
      });
    }
  });

  describe('Flory–Huggins polymer solution near its critical temperature', () => {
    // Flory (1953) ch. XIII; Rubinstein & Colby (2003) ch. 4: chi_c = (1/2)(1 + N_B^-1/2)^2 for N_A = 1,
    // phi_c = 1/(1 + sqrt(N_B)); with chi = A + B/T (spec), Tc = B/(chi_c - A). The gap exists for
    // every T < Tc and, close to Tc, surrounds phi_c.
    const p = { NA: 1, NB: 1000, A: 0.2, B: 150 };
    const chiC = 0.5 * (1 + 1 / Math.sqrt(p.NB)) ** 2, phiC = 1 / (1 + Math.sqrt(p.NB));
    const Tc = p.B / (chiC - p.A);
    for (const delta of [1e-3, 1e-5, 1e-6, 1e-7, 1e-8, 1e-9]) {
      it(`T = Tc (1 - ${delta})`, () => {
        let map: PhaseMap | undefined;
        expect(failureReason(() => { map = phaseMap(floryHuggins(p).at(Tc * (1 - delta))); })).toBe('no error');
        expect(map!.gaps).toHaveLength(1);
        expect(map!.gaps[0].low.x).toBeLessThan(phiC);
        expect(map!.gaps[0].high.x).toBeGreaterThan(phiC);
      });
    }
  });

  it('no gap and no spinodal above Tc, nor for Omega <= 0', () => {
    // Porter, Easterling & Sherif (2009) ch. 1: Tc = Omega/2R; above it g is convex everywhere
    const Tc = 20000 / (2 * R_SPEC);
    for (const T of [Tc * 1.001, Tc * 2]) {
      const map = phaseMap(regularSolution(20000).at(T));
      expect(map.gaps).toHaveLength(0);
      expect(map.spinodal).toHaveLength(0);
    }
    expect(phaseMap(regularSolution(-10000).at(300)).gaps).toHaveLength(0);
    expect(phaseMap(regularSolution(0).at(300)).gaps).toHaveLength(0);
  });
});

/** Systems with gaps well away from their critical points, for the hull cross-check. */
interface System {
  name: string;
  model: BinaryModel;
  T: number;
  g: (x: number, y: number) => number;
  ref: Reference;
  gaps: number;
}

const rkSystem = (name: string, terms: RkTerm[], T: number, gaps: number): System => ({
  name, model: redlichKister(terms), T, g: (x, y) => rkG(terms, T, x, y), ref: reference(rkText(terms)), gaps,
});
const fhSystem = (name: string, p: FhParams, T: number): System => ({
  name, model: floryHuggins(p), T, g: (x, y) => fhG(p, T, x, y), ref: reference(fhText(p)), gaps: 1,
});
const nrtlSystem = (name: string, p: NrtlParams, T: number): System => ({
  name, model: nrtl(p), T, g: (x, y) => nrtlG(p, T, x, y), ref: reference(nrtlText(p)), gaps: 1,
});

const SYSTEMS: System[] = [
  rkSystem('RK, L0 and L1', [{ a: 20000, b: 0, c: 0 }, { a: 6000, b: 0, c: 0 }], 800, 1),
  rkSystem('RK, three terms with T slopes', [{ a: 25000, b: -5, c: 0 }, { a: -4000, b: 2, c: 0 }, { a: 3000, b: 0, c: 0 }], 900, 1),
  rkSystem(
    'RK, four terms with T ln T',
    [{ a: 30000, b: -10, c: 0.5 }, { a: 8000, b: 0, c: 0 }, { a: -2000, b: 1, c: 0 }, { a: 1500, b: 0, c: -0.2 }],
    700, 1,
  ),
  // two symmetric gaps: L0 = -5000, L1 = 0, L2 = 60000 J/mol at 600 K
  rkSystem('RK, two gaps (L0 = -5000, L2 = 60000)', [{ a: -5000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }], 600, 2),
  // below the three-phase temperature of the same series: one wide gap over two unstable intervals
  rkSystem('RK, one wide gap (L0 = 10000, L2 = 60000 at 300 K)', [{ a: 10000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }], 300, 1),
  fhSystem('Flory–Huggins, polymer B (N = 100) in solvent', { NA: 1, NB: 100, A: 0.3, B: 200 }, 400),
  fhSystem('Flory–Huggins, asymmetric blend', { NA: 30, NB: 80, A: 0, B: 30 }, 500),
  nrtlSystem('NRTL, constant taus', { a12: 2.5, b12: 0, a21: 1.2, b21: 0, alpha: 0.2 }, 350),
];

describe('binodal against the convex hull of g (d3-polygon polygonHull)', () => {
  // 20001 samples: grid spacing h = 5e-5.
  const N = 20001;
  for (const s of SYSTEMS) {
    it(s.name, () => {
      const map = phaseMap(s.model.at(s.T));
      const { h, gaps: hull } = hullGaps(s.g, N);
      expect(hull.length, 'gaps in the hull').toBe(s.gaps);
      expect(map.gaps.length, 'gaps from phaseMap').toBe(s.gaps);
      map.gaps.forEach((gap, i) => {
        // The hull edge ends at the grid points where the sampled curve meets its supporting
        // line. By the mean value theorem each chord slope is g' somewhere in its cell, so the
        // contact vertex is within one cell of the point where g' equals the edge's slope, and
        // that slope differs from the true tangent's by less than a chord's error, one more cell:
        // 2h.
        expect(Math.abs(gap.low.x - hull[i].low), `gap ${i + 1} x'`).toBeLessThanOrEqual(2 * h);
        expect(Math.abs(gap.high.x - hull[i].high), `gap ${i + 1} x''`).toBeLessThanOrEqual(2 * h);
        // The hull's edge, refined by Newton on the equal-chemical-potential equations with the
        // symbolic derivatives: the same tangent to rounding. u is resolved to ~1e-14 by both
        // (residuals rounded at 1e-16 of mu); 1e-10 in u (1e-10 relative in the dilute fraction)
        // leaves a wide margin.
        const clamp = (x: number) => Math.min(Math.max(x, h / 4), 1 - h / 4);
        const t = refineTangent(s.ref, s.T, logit(clamp(hull[i].low)), logit(clamp(hull[i].high)));
        expect(Math.abs(gap.low.u - t.u1), `gap ${i + 1} u' (refined ${t.u1})`).toBeLessThan(1e-10);
        expect(Math.abs(gap.high.u - t.u2), `gap ${i + 1} u'' (refined ${t.u2})`).toBeLessThan(1e-10);
      });
    });
  }

  it('the two-gap system is symmetric about x = 1/2 and each gap holds one unstable interval', () => {
    const map = phaseMap(SYSTEMS[3].model.at(600));
    expect(map.gaps).toHaveLength(2);
    expect(map.spinodal).toHaveLength(4);
    const [g1, g2] = map.gaps;
    // L(1-2x)^k with k even is symmetric under x <-> 1 - x: gap 2 mirrors gap 1; 1e-12 relative
    // is rounding of u (a few ulps) with margin
    expect(Math.abs(g2.high.y - g1.low.x) / g1.low.x).toBeLessThan(1e-12);
    expect(Math.abs(g2.low.y - g1.high.x) / g1.high.x).toBeLessThan(1e-12);
    expect(g1.low.x).toBeLessThan(map.spinodal[0].x);
    expect(map.spinodal[1].x).toBeLessThan(g1.high.x);
    expect(g2.low.x).toBeLessThan(map.spinodal[2].x);
    expect(map.spinodal[3].x).toBeLessThan(g2.high.x);
    expect(g1.high.x).toBeLessThan(0.5);
  });
});

describe('common-tangent invariants over random Redlich–Kister systems (fast-check)', () => {
  const stats = { tried: 0, withGaps: 0, noGap: 0, gaps: 0, twoOrMore: 0, wide: 0, errors: new Map<string, number>() };
  afterAll(() => {
    const errors = [...stats.errors].map(([r, n]) => `${r}: ${n}`).join(', ') || 'none';
    console.info(`binodal invariants: ${stats.tried} systems tried, ${stats.withGaps} with gaps (${stats.gaps} gaps in all, ${stats.twoOrMore} systems with two or more, ${stats.wide} gaps holding two unstable intervals), ${stats.noGap} without, MixgapErrors: ${errors}`);
  });

  /**
   * Up to four terms L_k(T) = a_k + b_k T + c_k T ln T with random slopes b, c. The temperature and
   * the values L_k(T) are drawn first and a_k is set to give them. Two kinds of systems:
   * - one dome: L0(T) between 2.001 RT (just below the regular-solution critical value 2 RT) and
   *   15 RT, higher terms up to 60 % of L0(T): nearly always one gap, often dilute;
   * - two domes: L0(T) < RT and a large L2(T) (as in the two-gap system above) with small odd
   *   terms: mostly two gaps, sometimes one wide gap holding two unstable intervals;
   * - free: every L_k(T)/RT between -10 and 25: none, one or two gaps.
   */
  const slopes = fc.array(fc.tuple(fc.double({ min: -20, max: 20, noNaN: true }), fc.double({ min: -3, max: 3, noNaN: true })), { minLength: 4, maxLength: 4 });
  const oneDome = fc.record({
    strength: fc.double({ min: 2.001, max: 15, noNaN: true }),
    higher: fc.array(fc.double({ min: -0.6, max: 0.6, noNaN: true }), { minLength: 0, maxLength: 3 }),
  }).map(({ strength, higher }) => [strength, ...higher.map((f) => f * strength)]);
  const twoDomes = fc.tuple(
    fc.double({ min: -6, max: 1, noNaN: true }), fc.double({ min: -2, max: 2, noNaN: true }),
    fc.double({ min: 8, max: 30, noNaN: true }), fc.double({ min: -2, max: 2, noNaN: true }),
  );
  const free = fc.array(fc.double({ min: -10, max: 25, noNaN: true }), { minLength: 1, maxLength: 4 });
  const system = fc.record({
    T: fc.double({ min: 150, max: 2500, noNaN: true }),
    reduced: fc.oneof(oneDome, twoDomes, free),
    slopes,
    where: fc.double({ min: 0, max: 1, noNaN: true }),
  }).map(({ T, reduced, slopes, where }) => {
    const terms: RkTerm[] = reduced.map((r, k) => {
      const [b, c] = slopes[k];
      return { a: r * R_SPEC * T - b * T - c * T * Math.log(T), b, c };
    });
    return { T, terms, where };
  });

  it('equal potentials, spinodal inside, tangent below g, lever rule', () => {
    fc.assert(
      fc.property(system, ({ T, terms, where }) => {
        stats.tried++;
        let map: PhaseMap;
        try {
          map = phaseMap(redlichKister(terms).at(T));
        } catch (e) {
          if (!(e instanceof MixgapError)) throw e;
          stats.errors.set(e.reason, (stats.errors.get(e.reason) ?? 0) + 1);
          return; // allowed, counted
        }
        const RT = R_SPEC * T;
        const L = rkL(terms, T);
        const g = (x: number, y: number) => rkG(terms, T, x, y);
        const dg = (x: number, y: number) => rkDg(terms, T, x, y);
        const mu = (p: { x: number; y: number }) => {
          const G = g(p.x, p.y), D = dg(p.x, p.y);
          return { A: G - p.x * D, B: G + p.y * D };
        };
        if (map.gaps.length === 0) {
          stats.noGap++;
          // spec: unstable intervals lie inside gaps, so no gap means no unstable interval
          expect(map.spinodal).toHaveLength(0);
          // and the hull of the sampled g has no edge spanning 20 cells or more
          const hull = hullGaps(g, 2001);
          expect(hull.gaps.filter((e) => e.high - e.low >= 20 * hull.h)).toHaveLength(0);
          return;
        }
        stats.withGaps++;
        stats.gaps += map.gaps.length;
        if (map.gaps.length > 1) stats.twoOrMore++;

        // spinodal points are roots of g'' (independent formula): x y g''/RT is 0 there to rounding
        // (terms of size 1 + sum |L_k|/RT rounded at eps; 1e-9 covers the root tolerance too)
        const scale = 1 + L.reduce((s, l) => s + Math.abs(l), 0) / RT;
        for (const s of map.spinodal) expect(Math.abs((s.x * s.y * rkD2g(terms, T, s.x, s.y)) / RT)).toBeLessThan(1e-9 * scale);

        // gaps ordered from low x and disjoint
        for (let i = 0; i + 1 < map.gaps.length; i++) expect(map.gaps[i].high.x).toBeLessThan(map.gaps[i + 1].low.x);

        // every unstable interval lies inside exactly one gap, strictly (spec: the envelope
        // cannot touch g where g'' < 0): x' < s_low and s_high < x''
        for (let i = 0; i < map.spinodal.length; i += 2) {
          const lo = map.spinodal[i], hi = map.spinodal[i + 1];
          const holders = map.gaps.filter((gap) => gap.low.x < lo.x && hi.x < gap.high.x);
          expect(holders, `unstable interval ${lo.x}..${hi.x}`).toHaveLength(1);
        }
        // the gaps agree with the lower convex hull of the sampled g (d3-polygon): every hull edge
        // spanning 20 cells or more is a returned gap to within 2 cells (see the hull tests above
        // for the 2h), and every returned gap wider than 40 cells shows in the hull
        const hull = hullGaps(g, 2001);
        const h = hull.h;
        for (const e of hull.gaps.filter((e) => e.high - e.low >= 20 * h)) {
          const match = map.gaps.some((gap) => Math.abs(gap.low.x - e.low) <= 2 * h && Math.abs(gap.high.x - e.high) <= 2 * h);
          if (!match) expect.fail(`hull gap ${e.low}..${e.high} is not among the returned gaps ${map.gaps.map((q) => `${q.low.x}..${q.high.x}`).join(', ')}`);
        }
        for (const gap of map.gaps.filter((q) => q.high.x - q.low.x > 40 * h)) {
          const match = hull.gaps.some((e) => Math.abs(gap.low.x - e.low) <= 2 * h && Math.abs(gap.high.x - e.high) <= 2 * h);
          if (!match) expect.fail(`returned gap ${gap.low.x}..${gap.high.x} is not in the hull`);
        }

        for (const gap of map.gaps) {
          // and every gap holds at least one unstable interval (away from a critical point)
          const inside = map.spinodal.filter((s) => gap.low.x < s.x && s.x < gap.high.x).length;
          expect(inside).toBeGreaterThan(0);
          if (inside > 2) stats.wide++;
          checkTangent(gap);
          checkLever(gap);
        }

        function checkTangent(gap: Gap) {
          const m1 = mu(gap.low), m2 = mu(gap.high);
          // equal chemical potentials, independent formulas: the project's bound of 1e-6 J/mol
          expect(Math.abs(m1.A - m2.A), 'mu_A difference').toBeLessThan(1e-6);
          expect(Math.abs(m1.B - m2.B), 'mu_B difference').toBeLessThan(1e-6);
          // the tangent line through x' with the common slope lies below g on a dense grid:
          // line(x) = mu_A + m x with m = mu_B - mu_A; g - line >= -tol. Rounding of g and of the
          // line is a few eps of |m| + |g| + RT + sum|L|; 1e-9 of that is far above rounding and far
          // below the J/mol by which a wrong (metastable) tangent cuts g.
          const m = m1.B - m1.A;
          const tol = 1e-9 * (Math.abs(m) + RT + L.reduce((s, l) => s + Math.abs(l), 0));
          for (const x of DENSE) {
            const y = 1 - x;
            const below = g(x, y) - (m1.A + m * x);
            if (!(below >= -tol)) expect.fail(`tangent of gap ${gap.low.x}..${gap.high.x} cuts g at x = ${x} by ${-below} J/mol`);
          }
          for (const x of DILUTE) {
            // near x = 1 pass y exactly: line(1 - y) = mu_A + m - m y
            if (!(g(x, 1 - x) - (m1.A + m * x) >= -tol)) expect.fail(`tangent cuts g at x = ${x}`);
            if (!(g(1 - x, x) - (m1.B - m * x) >= -tol)) expect.fail(`tangent cuts g at x = 1 - ${x}`);
          }
        }

        function checkLever(gap: Gap) {
          const x0 = gap.low.x + where * (gap.high.x - gap.low.x);
          const f = leverFractions(x0, gap);
          // spec: fractions in [0, 1], summing to 1 (to rounding: 1 - f'' is exact in binary
          // for f'' in [1/2, 1], within 1 ulp otherwise)
          expect(f.low).toBeGreaterThanOrEqual(0);
          expect(f.high).toBeLessThanOrEqual(1);
          expect(f.high).toBeGreaterThanOrEqual(0);
          expect(f.low).toBeLessThanOrEqual(1);
          expect(Math.abs(f.low + f.high - 1)).toBeLessThanOrEqual(EPS);
          // mass balance: f' x' + f'' x'' = x0, to a few ulps of 1
          expect(Math.abs(f.low * gap.low.x + f.high * gap.high.x - x0)).toBeLessThan(4 * EPS);
        }
      }),
      { seed: 42, numRuns: 1000 },
    );
    // the property must have exercised gaps, not only errors or homogeneous systems
    expect(stats.withGaps).toBeGreaterThan(400);
    expect(stats.twoOrMore).toBeGreaterThan(100);
  }, 120_000); // a generous limit for slow machines: this is not a speed test
});

/** Uniform grid over (0, 1) plus log-spaced points towards both ends, built once. */
const DENSE: number[] = [];
for (let i = 1; i < 2000; i++) DENSE.push(i / 2000);
const DILUTE: number[] = [];
for (let e = -300; e <= -3; e += 0.25) DILUTE.push(10 ** e);
