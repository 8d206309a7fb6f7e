/**
 * criticalPoints: regular-solution and Flory–Huggins closed forms, a closed loop (lower and upper
 * critical points), and critical points of asymmetric systems from the spec's conditions solved
 * independently.
 */
import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/core/binodal';
import { criticalPoint, criticalPoints } from '../../src/core/critical';
import { floryHuggins } from '../../src/core/models/floryHuggins';
import { redlichKister, regularSolution } from '../../src/core/models/redlichKister';
import { failureReason } from './support/compare';
import { bisect } from './support/roots';
import { R_SPEC, rkD2g, rkL, rkText, type FhParams, type RkTerm } from './support/spec';
import { reference } from './support/symbolic';

// Tc is the root in T of a smooth function with a simple zero, xc the root of dq/du at a simple
// minimum of q: both are resolved to near rounding (1e-13 or better). 1e-9 relative allows for
// rounding amplified by the conditioning of these roots, and is far below any modelling error.
const REL = 1e-9;

describe('regular solution', () => {
  for (const omega of [5000, 20000, 60000, 150000]) {
    it(`Omega = ${omega} J/mol: one upper critical point at Tc = Omega/2R, xc = 1/2`, () => {
      // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega / 2R
      const Tc = omega / (2 * R_SPEC);
      const points = criticalPoints(regularSolution(omega));
      expect(points).toHaveLength(1);
      expect(points[0].kind).toBe('upper');
      expect(Math.abs(points[0].T - Tc) / Tc).toBeLessThan(REL);
      // Hillert, Phase Equilibria, Phase Diagrams and Phase Transformations, 2nd ed. (2008): xc = 1/2 by symmetry
      expect(Math.abs(points[0].x - 0.5)).toBeLessThan(REL);
    });
  }

  it('no critical point for Omega <= 0 or Tc above the 20000 K search window', () => {
    expect(criticalPoints(regularSolution(-8000))).toHaveLength(0);
    expect(criticalPoints(regularSolution(0))).toHaveLength(0);
    // Tc = 400000 / 2R = 24055 K > 20000 K
    expect(criticalPoints(regularSolution(400000))).toHaveLength(0);
  });
});

describe('Flory–Huggins', () => {
  // Flory, Principles of Polymer Chemistry (1953), ch. XIII; Rubinstein & Colby, Polymer Physics (2003), ch. 4:
  // chi_c = (1/2)(N_A^-1/2 + N_B^-1/2)^2, phi_c = sqrt(N_A)/(sqrt(N_A) + sqrt(N_B))
  const chiC = (p: FhParams) => 0.5 * (1 / Math.sqrt(p.NA) + 1 / Math.sqrt(p.NB)) ** 2;
  const phiC = (p: FhParams) => Math.sqrt(p.NA) / (Math.sqrt(p.NA) + Math.sqrt(p.NB));
  const cases: Array<{ name: string; p: FhParams; kind: 'upper' | 'lower' }> = [
    { name: 'symmetric blend N = 100', p: { NA: 100, NB: 100, A: -0.01, B: 15 }, kind: 'upper' },
    { name: 'polymer B (N = 1000) in a solvent', p: { NA: 1, NB: 1000, A: 0.2, B: 150 }, kind: 'upper' },
    { name: 'asymmetric blend N_A = 50, N_B = 200', p: { NA: 50, NB: 200, A: 0.001, B: 20 }, kind: 'upper' },
    // chi = A + B/T with B < 0 rises with T: the gap opens on heating (lower critical point)
    { name: 'polymer in a solvent, B < 0', p: { NA: 1, NB: 1000, A: 0.8, B: -100 }, kind: 'lower' },
    { name: 'solvent-rich side: polymer A (N = 400) in solvent B, B < 0', p: { NA: 400, NB: 1, A: 0.7, B: -60 }, kind: 'lower' },
  ];
  for (const { name, p, kind } of cases) {
    it(`${name}: Tc = B/(chi_c - A), phi_c, ${kind}`, () => {
      const Tc = p.B / (chiC(p) - p.A); // chi(Tc) = chi_c with chi = A + B/T (spec)
      const points = criticalPoints(floryHuggins(p));
      expect(points).toHaveLength(1);
      expect(points[0].kind).toBe(kind);
      expect(Math.abs(points[0].T - Tc) / Tc).toBeLessThan(REL);
      expect(Math.abs(points[0].x - phiC(p)) / phiC(p)).toBeLessThan(REL);
    });
  }
});

describe('closed loop: L0 = -30000 + 270 T - 30 T ln T J/mol', () => {
  const terms: RkTerm[] = [{ a: -30000, b: 270, c: -30 }];
  const model = redlichKister(terms);
  // Porter, Easterling & Sherif (2009) ch. 1: the regular-solution critical condition Omega = 2 R Tc,
  // here with Omega = L0(T): the critical temperatures are the roots of L0(T) - 2RT, xc = 1/2.
  // L0(T) - 2RT has its maximum where 270 - 30 ln T - 30 - 2R = 0.
  const f = (T: number) => rkL(terms, T)[0] - 2 * R_SPEC * T;
  const Tmax = Math.exp((240 - 2 * R_SPEC) / 30);
  const Tlow = bisect(f, 1, Tmax), Tup = bisect(f, Tmax, 20000);
  const points = criticalPoints(model);

  it('an upper and a lower critical point at the roots of L0(T) = 2RT, highest first', () => {
    expect(points.map((p) => p.kind)).toEqual(['upper', 'lower']);
    expect(Math.abs(points[0].T - Tup) / Tup).toBeLessThan(REL);
    expect(Math.abs(points[1].T - Tlow) / Tlow).toBeLessThan(REL);
    for (const p of points) expect(Math.abs(p.x - 0.5)).toBeLessThan(REL);
  });

  it("g'' = g''' = 0 at each critical point (independent g'' and symbolic g''')", () => {
    const ref = reference(rkText(terms));
    for (const p of points) {
      const x = p.x, y = 1 - x, RT = R_SPEC * p.T;
      // spec: critical point d2g/dx2 = d3g/dx3 = 0. Scaled by x y/RT and (x y)^2/RT these are of
      // order 1 away from it; errors of 1e-12 in T and x leave them below 1e-9.
      expect(Math.abs((x * y * rkD2g(terms, p.T, x, y)) / RT)).toBeLessThan(1e-9);
      expect(Math.abs((x * x * y * y * ref.at(3, x, p.T).value) / RT)).toBeLessThan(1e-9);
    }
  });

  it('a gap just inside the loop and none just outside', () => {
    // spec: upper critical point, the gap exists just below Tc; lower, just above
    const [up, low] = points;
    const gaps = (T: number) => phaseMap(model.at(T)).gaps.length;
    expect(gaps(up.T * (1 - 1e-3))).toBe(1);
    expect(gaps(up.T * (1 + 1e-3))).toBe(0);
    expect(gaps(low.T * (1 + 1e-3))).toBe(1);
    expect(gaps(low.T * (1 - 1e-3))).toBe(0);
    expect(gaps(Tmax)).toBe(1);
    expect(gaps(100)).toBe(0);
  });

  it('criticalPoint numbers them from 1 and refuses the rest', () => {
    expect(criticalPoint(points, 1)).toBe(points[0]);
    expect(criticalPoint(points, 2)).toBe(points[1]);
    expect(failureReason(() => criticalPoint(points, 3))).toBe('range');
    expect(failureReason(() => criticalPoint(points, 0))).toBe('range');
    expect(failureReason(() => criticalPoint(points, 1.5))).toBe('range');
    expect(failureReason(() => criticalPoint([], 1))).toBe('none');
  });
});

describe('asymmetric Redlich–Kister: critical points from the spec conditions, solved here', () => {
  /**
   * With temperature-independent L_k, g'' = RT/(x y) + E''(x) = 0 gives the spinodal temperature
   * Ts(x) = -x y E''(x)/R, and g''' = 0 there is dTs/dx = 0 (spec: d2g = d3g = 0 at a critical
   * point): an upper critical point is a local maximum of Ts. Ts is evaluated with the symbolic
   * E'' (36 digits) and maximised by golden-section search on a bracket found by scanning.
   */
  function independentCritical(terms: RkTerm[]): Array<{ T: number; x: number }> {
    const ref = reference(rkText(terms));
    const Ts = (x: number) => (-x * (1 - x) * ref.at(2, x, 1000).excess) / R_SPEC;
    const found: Array<{ T: number; x: number }> = [];
    const n = 400;
    const xs = Array.from({ length: n + 1 }, (_, i) => 0.001 + (0.998 * i) / n);
    const v = xs.map(Ts);
    for (let i = 1; i < n; i++) {
      if (!(v[i] > 0 && v[i] >= v[i - 1] && v[i] >= v[i + 1])) continue;
      let a = xs[i - 1], b = xs[i + 1];
      const r = (Math.sqrt(5) - 1) / 2;
      for (let k = 0; k < 80; k++) {
        const c = b - r * (b - a), d = a + r * (b - a);
        if (Ts(c) > Ts(d)) b = d; else a = c;
      }
      const x = 0.5 * (a + b);
      found.push({ x, T: Ts(x) });
    }
    return found.sort((p, q) => q.T - p.T);
  }

  const systems: Array<{ name: string; terms: RkTerm[]; count: number }> = [
    { name: 'L0 = 20000, L1 = 6000', terms: [{ a: 20000, b: 0, c: 0 }, { a: 6000, b: 0, c: 0 }], count: 1 },
    { name: 'L0 = 18000, L1 = -7000, L2 = 4000', terms: [{ a: 18000, b: 0, c: 0 }, { a: -7000, b: 0, c: 0 }, { a: 4000, b: 0, c: 0 }], count: 1 },
    { name: 'two domes: L0 = -5000, L2 = 60000', terms: [{ a: -5000, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 60000, b: 0, c: 0 }], count: 2 },
  ];
  for (const { name, terms, count } of systems) {
    it(name, () => {
      const want = independentCritical(terms);
      expect(want).toHaveLength(count);
      const got = criticalPoints(redlichKister(terms));
      expect(got).toHaveLength(count);
      // The maximum of Ts is flat: golden section locates x to ~1e-8 (sqrt of rounding) but T to
      // ~1e-15 relative, so T is compared at REL and x at 1e-6.
      const byX = [...got].sort((p, q) => p.x - q.x), wantByX = [...want].sort((p, q) => p.x - q.x);
      byX.forEach((p, i) => {
        expect(p.kind).toBe('upper');
        expect(Math.abs(p.T - wantByX[i].T) / wantByX[i].T).toBeLessThan(REL);
        expect(Math.abs(p.x - wantByX[i].x)).toBeLessThan(1e-6);
      });
    });
  }
});
