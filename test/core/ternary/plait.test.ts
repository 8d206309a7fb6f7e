/**
 * Plait points: a closed form of a symmetric system, the critical conditions checked with mathjs
 * symbolic derivatives of the spec's g (det H = 0 and g'''[v, v, v] = 0 along the null vector v of
 * H), and the split's tie-lines shrinking onto the plait point.
 */
import type { BigNumber, MathNode } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { plaitPoints } from '../../../src/core/ternary/plait';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import { splitFeed } from '../../../src/core/ternary/split';
import { R_SPEC } from '../support/spec';
import { big, exact } from '../support/symbolic';
import { rk3Text, type Rk3 } from './spec3';

const T = 300, RT = R_SPEC * T;
const term = (w: number) => ({ a: w * RT, b: 0, c: 0 });

// Invented systems (our own numbers): one with an A–C gap only, one with gaps on every edge.
const ONE_GAP: Rk3 = { AB: [term(1.0)], AC: [term(3.0)], BC: [term(0.5)] };
const ALL_GAPS: Rk3 = {
  AB: [term(3.0), term(0.4)], AC: [term(2.6), term(-0.5), term(0.2)], BC: [term(2.3), term(0.3)],
  ternary: { A: term(0.5), B: term(-0.3), C: term(0.2) },
};

describe('plait points', () => {
  it('symmetric in B and C: x_B = x_C = RT / Omega_BC', () => {
    // Derived here from the spec's g (common practice, no published source): with
    // Omega_AB = Omega_AC, g is symmetric under B <-> C, so on x_B = x_C the Hessian's null vector is
    // v = (1, -1), where d2g/dt2 = RT (1/x_B + 1/x_C) - 2 Omega_BC vanishes at x_B = x_C = RT/Omega_BC,
    // and g'''[v, v, v] = RT (1/x_C^2 - 1/x_B^2) = 0 by the symmetry. At Omega_BC = 2RT this is the
    // binary critical point x = 1/2 (Porter, Easterling & Sherif (2009) sec. 1.5: Tc = Omega/2R).
    for (const w of [2.5, 3.2]) {
      const model = ternaryRedlichKister({ AB: [term(0.5)], AC: [term(0.5)], BC: [term(w)] });
      const pts = plaitPoints(model, T);
      expect(pts.length).toBe(1);
      const s = 1 / w;
      // Newton stops at 1e-10 in log-ratio; the finite-difference M shifts the root by ~1e-10
      expect(Math.abs(pts[0].xB - s)).toBeLessThan(1e-8);
      expect(Math.abs(pts[0].xC - s)).toBeLessThan(1e-8);
      expect(Math.abs(pts[0].xA - (1 - 2 * s))).toBeLessThan(1e-8);
    }
  });

  it('a miscible system has none', () => {
    expect(plaitPoints(ternaryRedlichKister({ AB: [term(1)], AC: [term(1.5)], BC: [term(0.5)] }), T)).toEqual([]);
  });

  for (const [name, p] of [['one A–C gap', ONE_GAP], ['gaps on every edge', ALL_GAPS]] as const) {
    it(`${name}: det H = 0 and g'''[v, v, v] = 0 by symbolic differentiation`, () => {
      const pts = plaitPoints(ternaryRedlichKister(p), T);
      expect(pts.length).toBeGreaterThan(0);
      const text = rk3Text(p);
      const g = big.parse(`${text.ideal} + ${text.excess}`);
      const d = (n: MathNode, v: string): MathNode => big.derivative(n, v, { simplify: false });
      const gB = d(g, 'xB'), gC = d(g, 'xC');
      const H = [d(gB, 'xB'), d(gB, 'xC'), d(gC, 'xC')];
      const K = [d(H[0], 'xB'), d(H[0], 'xC'), d(H[1], 'xC'), d(H[2], 'xC')]; // gBBB, gBBC, gBCC, gCCC
      const hc = H.map((n) => n.compile()), kc = K.map((n) => n.compile());
      for (const q of pts) {
        const scope = { xB: exact(q.xB), xC: exact(q.xC), T: exact(T) };
        const [hBB, hBC, hCC] = hc.map((f) => big.number(f.evaluate(scope) as BigNumber) as number);
        const [kBBB, kBBC, kBCC, kCCC] = kc.map((f) => big.number(f.evaluate(scope) as BigNumber) as number);
        // det H against the size of its terms: the plait point is accurate to ~1e-10 in u, so
        // det H is ~1e-9 of hBB hCC; 1e-7 leaves room and is far below any off-spinodal point
        expect(Math.abs(hBB * hCC - hBC * hBC)).toBeLessThan(1e-7 * Math.abs(hBB * hCC));
        // null vector of H and the cubic form along it, against the size of its terms
        const vB = Math.abs(hBB) > Math.abs(hCC) ? -hBC : hCC, vC = Math.abs(hBB) > Math.abs(hCC) ? hBB : -hBC;
        const n = Math.hypot(vB, vC), b = vB / n, c = vC / n;
        const cubic = kBBB * b ** 3 + 3 * kBBC * b * b * c + 3 * kBCC * b * c * c + kCCC * c ** 3;
        const size = Math.abs(kBBB) + 3 * Math.abs(kBBC) + 3 * Math.abs(kBCC) + Math.abs(kCCC);
        expect(Math.abs(cubic), `${name}: g'''[v,v,v] at (${q.xA}, ${q.xB}, ${q.xC})`).toBeLessThan(1e-6 * size);
      }
    });
  }

  it('tie-lines near the plait point shrink onto it', () => {
    const model = ternaryRedlichKister(ONE_GAP);
    const [P] = plaitPoints(model, T);
    // into the two-phase region: towards the middle of the A–C edge's gap
    const Q = { xA: 0.5, xB: 1e-6, xC: 0.5 - 1e-6 };
    let last = Infinity;
    for (const s of [0.2, 0.05, 0.01]) {
      const z: [number, number, number] = [P.xA + s * (Q.xA - P.xA), P.xB + s * (Q.xB - P.xB), P.xC + s * (Q.xC - P.xC)];
      const r = splitFeed(model, T, ...z);
      expect(r.phases.length).toBe(2);
      const [u, v] = r.phases;
      const len = Math.hypot(u.xA - v.xA, u.xB - v.xB, u.xC - v.xC);
      const far = Math.max(...r.phases.map((w) => Math.hypot(w.xA - P.xA, w.xB - P.xB, w.xC - P.xC)));
      // the tie-line shortens as the feed nears P, and both ends come within a few times the
      // feed's own distance to P (tie-line half-length ~ sqrt(distance) near a critical point)
      expect(len).toBeLessThan(last);
      expect(far).toBeLessThan(3 * Math.sqrt(s * Math.hypot(Q.xA - P.xA, Q.xB - P.xB, Q.xC - P.xC)));
      last = len;
    }
  });
});
