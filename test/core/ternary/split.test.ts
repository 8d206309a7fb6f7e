/**
 * The ternary phase split: equal chemical potentials in every phase, mass balance, the tangent
 * plane below g over the whole triangle on a grid of our own (g from the spec's formulas in
 * spec3.ts, not from src/), the symmetric three-phase system, and each edge against the binary
 * gaps of src/core/equilibrium.ts.
 *
 * Why the plane check is the envelope check: if the plane l(x) = sum_i mu_i x_i lies below g at
 * every grid point and equals g at the returned phases, then every convex combination of grid
 * points with mean z has sum lambda_k g_k >= l(z) = sum_k f_k g(x_k): no grid hull can lie below
 * the returned face, which is what a brute-force lower envelope of the grid would be compared with.
 */
import { describe, expect, it } from 'vitest';
import { gapAt } from '../../../src/core/equilibrium';
import type { BinaryModel } from '../../../src/core/model';
import { floryHuggins } from '../../../src/core/models/floryHuggins';
import { nrtl } from '../../../src/core/models/nrtl';
import { redlichKister } from '../../../src/core/models/redlichKister';
import { ternaryFloryHuggins } from '../../../src/core/ternary/floryHuggins';
import { LOCAL_SIZE, MUA, type TernaryModel } from '../../../src/core/ternary/model';
import { ternaryNrtl } from '../../../src/core/ternary/nrtl';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import { splitFeed, type TernarySplit } from '../../../src/core/ternary/split';
import { failureReason } from '../support/compare';
import { R_SPEC } from '../support/spec';
import { fh3G, nrtl3G, rk3G, type Fh3, type Nrtl3, type Rk3 } from './spec3';

const T = 300, RT = R_SPEC * T;

// Invented systems (our own numbers), each binary edge with a gap at 300 K.
const RK: Rk3 = {
  AB: [{ a: 3.0 * RT, b: 0, c: 0 }, { a: 0.4 * RT, b: 0, c: 0 }],
  AC: [{ a: 2.6 * RT, b: 0, c: 0 }, { a: -0.5 * RT, b: 0, c: 0 }, { a: 0.2 * RT, b: 0, c: 0 }],
  BC: [{ a: 2.3 * RT, b: 0, c: 0 }, { a: 0.3 * RT, b: 0, c: 0 }],
  ternary: { A: { a: 0.5 * RT, b: 0, c: 0 }, B: { a: -0.3 * RT, b: 0, c: 0 }, C: { a: 0.2 * RT, b: 0, c: 0 } },
};
const NRTL: Nrtl3 = {
  a12: 2.0, b12: 0, a21: 1.5, b21: 0, a13: 1.8, b13: 0, a31: 2.4, b31: 0, a23: 2.2, b23: 0, a32: 2.2, b32: 0,
  alpha12: 0.2, alpha13: 0.3, alpha23: 0.25,
};
const FH: Fh3 = { NA: 1, NB: 20, NC: 2, chiAB: { A: 0.9, B: 0 }, chiAC: { A: 1.8, B: 0 }, chiBC: { A: 0.6, B: 0 } };

const SYSTEMS: Array<{ name: string; model: TernaryModel; g: (a: number, b: number, c: number) => number; edges: Record<'AB' | 'AC' | 'BC', BinaryModel> }> = [
  {
    name: 'Redlich–Kister', model: ternaryRedlichKister(RK), g: (a, b, c) => rk3G(RK, T, a, b, c),
    edges: { AB: redlichKister(RK.AB), AC: redlichKister(RK.AC), BC: redlichKister(RK.BC) },
  },
  {
    name: 'NRTL', model: ternaryNrtl(NRTL), g: (a, b, c) => nrtl3G(NRTL, T, a, b, c),
    edges: {
      AB: nrtl({ a12: 2.0, b12: 0, a21: 1.5, b21: 0, alpha: 0.2 }),
      AC: nrtl({ a12: 1.8, b12: 0, a21: 2.4, b21: 0, alpha: 0.3 }),
      BC: nrtl({ a12: 2.2, b12: 0, a21: 2.2, b21: 0, alpha: 0.25 }),
    },
  },
  {
    name: 'Flory–Huggins', model: ternaryFloryHuggins(FH), g: (a, b, c) => fh3G(FH, T, a, b, c),
    edges: {
      AB: floryHuggins({ NA: 1, NB: 20, A: 0.9, B: 0 }),
      AC: floryHuggins({ NA: 1, NB: 2, A: 1.8, B: 0 }),
      BC: floryHuggins({ NA: 20, NB: 2, A: 0.6, B: 0 }),
    },
  },
];

/** Our own check grid: uniform with 120 steps, plus layers at 1e-3 ... 1e-13 along every edge. */
const GRID: Array<[number, number, number]> = (() => {
  const pts: Array<[number, number, number]> = [];
  const n = 120;
  for (let i = 0; i <= n; i++) for (let j = 0; i + j <= n; j++) pts.push([i / n, j / n, (n - i - j) / n]);
  for (const d of [1e-3, 1e-5, 1e-7, 1e-9, 1e-13]) {
    for (let j = 1; j < 200; j++) {
      const p = ((1 - d) * j) / 200, q = ((1 - d) * (200 - j)) / 200;
      pts.push([d, p, q], [p, d, q], [p, q, d]);
    }
  }
  return pts;
})();

/** Checks every property of a split that the spec asks for; returns it. */
function expectValidSplit(name: string, model: TernaryModel, g: (a: number, b: number, c: number) => number, z: [number, number, number], r: TernarySplit): void {
  const iso = model.at(T), o = new Float64Array(LOCAL_SIZE);
  const what = `${name}, feed (${z.join(', ')})`;
  expect(r.phases.length).toBe(r.fractions.length);
  // phase fractions: non-negative and summing to 1 (rounding of three terms)
  expect(Math.abs(r.fractions.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-14);
  for (const f of r.fractions) expect(f).toBeGreaterThanOrEqual(0);
  // spec order: increasing x_C, then x_B (x_C equal within the solve's relative 1e-9)
  for (let k = 1; k < r.phases.length; k++) {
    const p = r.phases[k - 1], q = r.phases[k];
    const tie = Math.abs(p.xC - q.xC) <= 1e-9 * q.xC;
    expect(tie ? p.xB <= q.xB : p.xC < q.xC, `${what}: phase order`).toBe(true);
  }
  // mass balance sum_k f_k x_k = z: rounding of the fractions and phases, ~1e-15; 1e-12 allows the
  // lever rule's division by |x'' - x'| and flags any real imbalance
  for (const [i, key] of (['xA', 'xB', 'xC'] as const).entries()) {
    const sum = r.phases.reduce((s, p, k) => s + r.fractions[k] * p[key], 0);
    expect(Math.abs(sum - z[i]), `${what}: mass balance of ${key}`).toBeLessThan(1e-12);
  }
  // equal mu_A, mu_B, mu_C in every phase (the models' mu are checked against symbolic
  // derivatives in models.test.ts); Newton stops at 1e-9 RT or better
  for (const p of r.phases) {
    iso.local(p.xA, p.xB, p.xC, o);
    for (let i = 0; i < 3; i++) {
      expect(Math.abs(o[MUA + i] - r.mu[i]), `${what}: mu_${'ABC'[i]} in phase (${p.xA}, ${p.xB}, ${p.xC})`).toBeLessThan(1e-9 * (RT + Math.abs(r.mu[i])));
    }
    // the plane sum_i mu_i x_i touches g (spec3's g) at the phase
    const l = r.mu[0] * p.xA + r.mu[1] * p.xB + r.mu[2] * p.xC;
    expect(Math.abs(g(p.xA, p.xB, p.xC) - l)).toBeLessThan(1e-9 * (RT + Math.abs(r.mu[0]) + Math.abs(r.mu[1]) + Math.abs(r.mu[2])));
  }
  // the plane lies below g over the whole triangle (tolerance: rounding of g and the plane,
  // ~1e-15 of RT and mu, far below any cut a wrong face makes)
  const tol = 1e-10 * (RT + Math.abs(r.mu[0]) + Math.abs(r.mu[1]) + Math.abs(r.mu[2]));
  let worst = Infinity, at: number[] = [];
  for (const [a, b, c] of GRID) {
    const D = g(a, b, c) - (r.mu[0] * a + r.mu[1] * b + r.mu[2] * c);
    if (D < worst) { worst = D; at = [a, b, c]; }
  }
  expect(worst, `${what}: the tangent plane cuts g at (${at.join(', ')})`).toBeGreaterThan(-tol);
}

describe('phase split of a ternary feed', () => {
  it('a symmetric system with Omega/RT = 3.5 on every pair: three phases related by symmetry', () => {
    // Regular-solution pairs (Redlich–Kister L0 only, spec: "the regular solution is the case k = 0
    // only"); Omega/RT = 3.5 > 2 gives each edge a gap (critical Omega/RT = 2: Porter, Easterling &
    // Sherif, Phase Transformations in Metals and Alloys (2009) sec. 1.5), and the centre splits
    // into three phases (a, b, b), (b, a, b), (b, b, a) by the symmetry of g under permutations.
    const O = { a: 3.5 * RT, b: 0, c: 0 };
    const p: Rk3 = { AB: [O], AC: [O], BC: [O] };
    const model = ternaryRedlichKister(p);
    const z: [number, number, number] = [1 / 3, 1 / 3, 1 / 3];
    const r = splitFeed(model, T, ...z);
    expect(r.phases.length).toBe(3);
    expectValidSplit('symmetric', model, (a, b, c) => rk3G(p, T, a, b, c), z, r);
    // spec order: the C-poorest first; with ties in x_C the B-poorer first: (a,b,b), (b,a,b), (b,b,a)
    const [P1, P2, P3] = r.phases;
    const a = P1.xA, b = P1.xB;
    // the symmetric images agree to Newton's convergence (1e-12 in log-ratio, times the fractions)
    const close = (u: number, v: number) => expect(Math.abs(u - v) / v).toBeLessThan(1e-9);
    close(P1.xC, b); close(P2.xB, a); close(P2.xA, b); close(P2.xC, b); close(P3.xC, a); close(P3.xA, b); close(P3.xB, b);
    expect(a).toBeGreaterThan(0.5);
    for (const f of r.fractions) expect(Math.abs(f - 1 / 3)).toBeLessThan(1e-9);
    // a feed elsewhere in the triangle gives the same three phases with other fractions
    const z2: [number, number, number] = [0.5, 0.3, 0.2];
    const r2 = splitFeed(model, T, ...z2);
    expect(r2.phases.length).toBe(3);
    expectValidSplit('symmetric', model, (x, y, w) => rk3G(p, T, x, y, w), z2, r2);
    for (let k = 0; k < 3; k++) close(r2.phases[k].xA, r.phases[k].xA);
  });

  for (const { name, model, g, edges } of SYSTEMS) {
    it(`${name}: feeds across the triangle give verified splits`, () => {
      const feeds: Array<[number, number, number]> = [
        [1 / 3, 1 / 3, 1 / 3], [0.5, 0.3, 0.2], [0.2, 0.5, 0.3], [0.15, 0.15, 0.7], [0.7, 0.2, 0.1], [0.98, 0.01, 0.01],
      ];
      const counts = new Set<number>();
      for (const z of feeds) {
        const r = splitFeed(model, T, ...z);
        counts.add(r.phases.length);
        expectValidSplit(name, model, g, z, r);
      }
      // the feeds were chosen to meet more than one kind of region
      expect(counts.size).toBeGreaterThan(1);
    });

    it(`${name}: 25 random feeds (seed 20261203) give verified splits`, () => {
      let seed = 20261203;
      // Park & Miller minimal standard generator (Comm. ACM 31 (1988) 1192)
      const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
      for (let k = 0; k < 25; k++) {
        let a = rnd(), b = rnd();
        if (a + b > 1) { a = 1 - a; b = 1 - b; }
        const z: [number, number, number] = [a, b, 1 - a - b];
        if (!(z[2] > 0)) continue;
        expectValidSplit(name, model, g, z, splitFeed(model, T, ...z));
      }
    });

    it(`${name}: 15 random feeds with one component at 1e-2 ... 1e-12 (seed 7) give verified splits`, () => {
      let seed = 7;
      // Park & Miller minimal standard generator (Comm. ACM 31 (1988) 1192)
      const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
      for (let k = 0; k < 15; k++) {
        const d = 10 ** (-2 - 10 * rnd()), w = rnd(), i = k % 3;
        const z: [number, number, number] = [0, 0, 0];
        z[i] = d; z[(i + 1) % 3] = (1 - d) * w; z[(i + 2) % 3] = (1 - d) * (1 - w);
        expectValidSplit(name, model, g, z, splitFeed(model, T, ...z));
      }
    });

    it(`${name}: a feed 1e-12 off each edge splits like the binary gap of that pair`, () => {
      for (const pair of ['AB', 'AC', 'BC'] as const) {
        const gap = gapAt(edges[pair], T);
        const x = (gap.low.x + gap.high.x) / 2, y = 1 - x, d = 1e-12;
        // the binary pair (i, j) has x = x_j; the third component is at 1e-12
        const z: [number, number, number] = pair === 'AB' ? [y, x - d, d] : pair === 'AC' ? [y, d, x - d] : [d, y, x - d];
        const r = splitFeed(model, T, ...z);
        expectValidSplit(name, model, g, z, r);
        expect(r.phases.length, `${name} ${pair}`).toBe(2);
        const j = pair === 'AB' ? 'xB' : 'xC';
        const xs = r.phases.map((p) => p[j]).sort((u, v) => u - v);
        // the third component at 1e-12 shifts the tie-line by O(1e-12) times the slopes of mu;
        // 1e-9 is far above that and far below any other gap
        expect(Math.abs(xs[0] - gap.low.x), `${name} ${pair} low`).toBeLessThan(1e-9);
        expect(Math.abs(xs[1] - gap.high.x), `${name} ${pair} high`).toBeLessThan(1e-9);
      }
    });
  }

  it('a polymer-lean phase far below 1e-15 keeps its digits', () => {
    // Solvent A, polymer B (N_B = 100), non-solvent C: the C-rich phase holds almost no polymer.
    const p: Fh3 = { NA: 1, NB: 100, NC: 1, chiAB: { A: 0.3, B: 0 }, chiAC: { A: 2.4, B: 0 }, chiBC: { A: 2.0, B: 0 } };
    const model = ternaryFloryHuggins(p), z: [number, number, number] = [0.4, 0.2, 0.4];
    const r = splitFeed(model, T, ...z);
    expectValidSplit('polymer', model, (a, b, c) => fh3G(p, T, a, b, c), z, r);
    const lean = r.phases.reduce((m, q) => (q.xB < m.xB ? q : m));
    expect(lean.xB).toBeLessThan(1e-15);
    expect(lean.xB).toBeGreaterThan(0);
    // per molecule N_B mu_B = RT ln phi_B + ...: equal in both phases to 1e-9 N_B RT means phi_B in
    // the lean phase is right to a relative 1e-7 (it would be 0 or noise if taken as 1 - others)
    const o = new Float64Array(LOCAL_SIZE), iso = model.at(T);
    const muB = r.phases.map((q) => { iso.local(q.xA, q.xB, q.xC, o); return p.NB * o[MUA + 1]; });
    expect(Math.abs(muB[0] - muB[1])).toBeLessThan(1e-9 * p.NB * RT);
  });

  it('a stable feed is one phase with fraction 1', () => {
    const small = { a: 1.2 * RT, b: 0, c: 0 };
    const p: Rk3 = { AB: [small], AC: [small], BC: [small] };
    const model = ternaryRedlichKister(p), z: [number, number, number] = [0.2, 0.3, 0.5];
    const r = splitFeed(model, T, ...z);
    expect(r.phases).toEqual([{ xA: 0.2, xB: 0.3, xC: 0.5 }]);
    expect(r.fractions).toEqual([1]);
    expectValidSplit('miscible', model, (a, b, c) => rk3G(p, T, a, b, c), z, r);
  });

  it('fractions that sum to 1 within 1e-9 are taken scaled to sum to 1', () => {
    // the ternary spec: three fractions must sum to 1 within 1e-9
    const { model } = SYSTEMS[0];
    const r = splitFeed(model, T, 0.5, 0.3, 0.2 + 5e-10), s = 1 + 5e-10;
    const sumB = r.phases.reduce((t, p, k) => t + r.fractions[k] * p.xB, 0);
    // mass balance against the scaled feed (1e-12 as in expectValidSplit), not the raw one
    expect(Math.abs(sumB - 0.3 / s)).toBeLessThan(1e-12);
  });

  it('refuses a feed on an edge, fractions that do not sum to 1, and T <= 0', () => {
    const model = SYSTEMS[0].model;
    expect(failureReason(() => splitFeed(model, T, 0.5, 0.5, 0))).toBe('range');
    expect(failureReason(() => splitFeed(model, T, 0.5, 0.3, 0.3))).toBe('range');
    expect(failureReason(() => splitFeed(model, 0, 0.5, 0.3, 0.2))).toBe('range');
  });
});

describe('what cannot be represented', () => {
  it('a phase below 1e-300 of a component is a convergence error that says so, not a number', () => {
    // Polymer B of 1000 sites in a strong non-solvent C: the C-rich phase would hold phi_B ~ e^-800.
    const model = ternaryFloryHuggins({ NA: 1, NB: 1000, NC: 1, chiAB: { A: 0.45, B: 0 }, chiAC: { A: 1.5, B: 0 }, chiBC: { A: 2.5, B: 0 } });
    let message = '';
    expect(failureReason(() => {
      try { splitFeed(model, T, 0.3, 0.1, 0.6); } catch (e) { message = String(e); throw e; }
    })).toBe('convergence');
    expect(message).toMatch(/1e-300/);
  });
});
