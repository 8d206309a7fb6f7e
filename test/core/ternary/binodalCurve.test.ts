/**
 * The binodal table: every row a tie-line with equal chemical potentials of all three components
 * (computed from the spec's g in spec3.ts, not from src/), the tangent plane of every row below
 * the spec's g on a grid of our own, the edge rows equal to the binary gaps of the pair's binary
 * model (src/core/equilibrium.ts, what GAPLOW/GAPHIGH answer), rows shrinking onto a plait point
 * that satisfies the critical conditions, and symmetric systems giving symmetric curves.
 */
import { describe, expect, it } from 'vitest';
import { gapAt } from '../../../src/core/equilibrium';
import { floryHuggins } from '../../../src/core/models/floryHuggins';
import { nrtl } from '../../../src/core/models/nrtl';
import { redlichKister } from '../../../src/core/models/redlichKister';
import { ternaryFloryHuggins } from '../../../src/core/ternary/floryHuggins';
import { ternaryNrtl } from '../../../src/core/ternary/nrtl';
import { binodalBranches, binodalTable, type TieEnds } from '../../../src/core/ternary/binodalCurve';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import type { TernaryPoint } from '../../../src/core/ternary/split';
import { failureReason } from '../support/compare';
import { R_SPEC } from '../support/spec';
import { fh3G, nrtl3G, rk3G, type Fh3, type Nrtl3, type Rk3 } from './spec3';

const T = 300, RT = R_SPEC * T;
const term = (w: number) => ({ a: w * RT, b: 0, c: 0 });

// Invented systems (our own numbers).
/** An A–C gap only: one branch from the A–C edge to a plait point (an extraction system). */
const ONE_GAP: Rk3 = { AB: [term(1.0)], AC: [term(3.0)], BC: [term(0.5)] };
/** Gaps on A–C and B–C: one band of tie-lines from edge to edge. */
const BAND: Rk3 = { AB: [term(0.5)], AC: [term(3.0)], BC: [term(2.8)] };
/** Symmetric in B and C, a B–C gap only: plait point at x_B = x_C = RT / Omega_BC. */
const SYM_BC: Rk3 = { AB: [term(0.5)], AC: [term(0.5)], BC: [term(3.0)] };
/** Three equal pairs: three branches ending on the sides of one three-phase triangle. */
const SYM3: Rk3 = { AB: [term(3.0)], AC: [term(3.0)], BC: [term(3.0)] };

const model = (p: Rk3) => ternaryRedlichKister(p);
const frac = (p: TernaryPoint) => [p.xA, p.xB, p.xC];

/**
 * mu_i from the spec: mu_i = g + sum_j (delta_ij - x_j) dg/dx_j with g of all three fractions.
 * The ideal part gives RT ln x_i exactly; the excess part g_E = g - RT sum x ln x is differentiated
 * by central differences (step 1e-6: truncation ~1e-12 RT, rounding ~1e-10 RT).
 */
function muSpec(p: Rk3, x: TernaryPoint): number[] {
  const v = frac(x);
  const gE = (a: number, b: number, c: number) => rk3G(p, T, a, b, c) - RT * (a * Math.log(a) + b * Math.log(b) + c * Math.log(c));
  const h = 1e-6;
  const d = [0, 1, 2].map((j) => {
    const up = [...v], dn = [...v];
    up[j] += h; dn[j] -= h;
    return (gE(up[0], up[1], up[2]) - gE(dn[0], dn[1], dn[2])) / (2 * h);
  });
  const g = gE(v[0], v[1], v[2]);
  return [0, 1, 2].map((i) => RT * Math.log(v[i]) + g + d[i] - (v[0] * d[0] + v[1] * d[1] + v[2] * d[2]));
}

/** g minus the tangent plane of the tie-line, at its lowest on a grid of step 1/150 (edges excluded), in RT. */
function lowestAbovePlane(p: Rk3, x: TernaryPoint): number {
  const mu = muSpec(p, x), N = 150;
  let low = Infinity;
  for (let i = 1; i < N; i++) {
    for (let j = 1; i + j < N; j++) {
      const a = i / N, b = j / N, c = (N - i - j) / N;
      low = Math.min(low, (rk3G(p, T, a, b, c) - (mu[0] * a + mu[1] * b + mu[2] * c)) / RT);
    }
  }
  return low;
}

const rowsOf = (t: Array<TieEnds | undefined>) => t.filter((r): r is TieEnds => r !== undefined);
const interior = (r: TieEnds) => r.every((p) => frac(p).every((v) => v > 1e-4));

describe('binodal table', () => {
  it('every row: equal mu_A, mu_B, mu_C in both ends (spec definition), distinct ends', () => {
    for (const p of [ONE_GAP, BAND, SYM3]) {
      const rows = rowsOf(binodalTable(model(p), T, 40)).filter(interior).filter((r) => r[0] !== r[1]);
      expect(rows.length).toBeGreaterThan(10);
      for (const [x1, x2] of rows) {
        const m1 = muSpec(p, x1), m2 = muSpec(p, x2);
        // the solve stops at 1e-11 RT; the finite differences of g_E add ~1e-10 RT
        for (let i = 0; i < 3; i++) expect(Math.abs(m1[i] - m2[i]) / RT, `${JSON.stringify([x1, x2])} mu_${'ABC'[i]}`).toBeLessThan(1e-8);
        expect(Math.hypot(x1.xA - x2.xA, x1.xB - x2.xB, x1.xC - x2.xC)).toBeGreaterThan(1e-5);
        // each end's fractions sum to 1 (rounding of three numbers near 1)
        for (const x of [x1, x2]) expect(Math.abs(x.xA + x.xB + x.xC - 1)).toBeLessThan(1e-14);
      }
    }
  });

  it('every row lies on the lower convex envelope: its tangent plane is below g on a grid of our own', () => {
    // Why this is the envelope check: see split.test.ts (a plane below g that touches g at both ends)
    for (const p of [ONE_GAP, SYM3]) {
      const rows = rowsOf(binodalTable(model(p), T, 12)).filter(interior);
      for (const [x1] of rows) {
        // 1e-9 RT: the plane from finite-difference potentials (~1e-10 RT) touching g at the ends
        expect(lowestAbovePlane(p, x1)).toBeGreaterThan(-1e-9);
      }
    }
  });

  it('the edge row is the binary gap of that pair (its binary Redlich–Kister model)', () => {
    // The spec: the A–C edge is exactly the binary Redlich–Kister model with x = x_C.
    const gap = gapAt(redlichKister(ONE_GAP.AC), T, 1);
    const [x1, x2] = binodalTable(model(ONE_GAP), T, 20)[0]!;
    expect(x1.xB).toBe(0);
    expect(x2.xB).toBe(0);
    // both solve the same two equations to ~1e-12 in log-ratio
    expect(Math.abs(x1.xC - gap.low.x) / gap.low.x).toBeLessThan(1e-9);
    expect(Math.abs(x2.xC - gap.high.x) / gap.high.x).toBeLessThan(1e-9);
    expect(Math.abs(x2.xA - gap.high.y) / gap.high.y).toBeLessThan(1e-9);
    // the symmetric regular solution: x' = 1 - x'' (Porter, Easterling & Sherif (2009) sec. 1.5, symmetric gap of the regular solution)
    expect(Math.abs(x1.xC - x2.xA)).toBeLessThan(1e-12);
  });

  it('a band from edge to edge ends on the other edge\'s binary gap', () => {
    const table = rowsOf(binodalTable(model(BAND), T, 30));
    const [first, last] = [table[0], table[table.length - 1]];
    const ac = gapAt(redlichKister(BAND.AC), T, 1), bc = gapAt(redlichKister(BAND.BC), T, 1);
    expect(first[0].xB).toBe(0);
    // 1e-9 relative: both sides solve the binary equilibrium to ~1e-12 in log-ratio
    expect(Math.abs(first[0].xC - ac.low.x) / ac.low.x).toBeLessThan(1e-9);
    expect(last[0].xA).toBe(0);
    const ends = [last[0].xC, last[1].xC].sort((a, b) => a - b);
    expect(Math.abs(ends[0] - bc.low.x) / bc.low.x).toBeLessThan(1e-9);
    expect(Math.abs(ends[1] - bc.high.x) / bc.high.x).toBeLessThan(1e-9);
    expect(binodalBranches(model(BAND), T).map((b) => b.end)).toEqual(['edge']);
  });

  it('rows shrink onto the plait point, which satisfies det H = 0 and the closed form of a symmetric system', () => {
    const w = 3.0, s = RT / (w * RT);
    const table = binodalTable(model(SYM_BC), T, 41);
    const rows = rowsOf(table);
    expect(rows).toHaveLength(41);
    const plait = rows[rows.length - 1];
    expect(plait[0]).toEqual(plait[1]);
    // Closed form (derived in plait.test.ts from the spec's g; common practice, no published source):
    // x_B = x_C = RT / Omega_BC. Newton on the critical conditions stops at ~1e-10.
    expect(Math.abs(plait[0].xB - s)).toBeLessThan(1e-8);
    expect(Math.abs(plait[0].xC - s)).toBeLessThan(1e-8);
    // det H = 0 there (spec: plait point), H from second differences of the spec's g in (x_B, x_C)
    const g = (b: number, c: number) => rk3G(SYM_BC, T, 1 - b - c, b, c);
    const h = 1e-4, b = plait[0].xB, c = plait[0].xC;
    const Hbb = (g(b + h, c) - 2 * g(b, c) + g(b - h, c)) / h ** 2;
    const Hcc = (g(b, c + h) - 2 * g(b, c) + g(b, c - h)) / h ** 2;
    const Hbc = (g(b + h, c + h) - g(b + h, c - h) - g(b - h, c + h) + g(b - h, c - h)) / (4 * h ** 2);
    // relative to Hbb Hcc: second differences at h = 1e-4 carry ~1e-7 relative error
    expect(Math.abs(Hbb * Hcc - Hbc * Hbc) / (Hbb * Hcc)).toBeLessThan(1e-5);
    // tie-line lengths fall toward the plait point, and the last rows' middles approach it
    const len = rows.slice(0, -1).map(([p, q]) => Math.hypot(p.xA - q.xA, p.xB - q.xB, p.xC - q.xC));
    for (let n = 1; n < len.length; n++) expect(len[n]).toBeLessThan(len[n - 1]);
    const mid = (r: TieEnds) => ({ xB: (r[0].xB + r[1].xB) / 2, xC: (r[0].xC + r[1].xC) / 2 });
    const dist = rows.slice(-6, -1).map((r) => Math.hypot(mid(r).xB - s, mid(r).xC - s));
    for (let n = 1; n < dist.length; n++) expect(dist[n]).toBeLessThan(dist[n - 1]);
    expect(dist[dist.length - 1]).toBeLessThan(0.05);
  });

  it('a system symmetric in B and C gives a symmetric curve: x\'\' is x\' with x_B and x_C exchanged', () => {
    for (const [x1, x2] of rowsOf(binodalTable(model(SYM_BC), T, 25))) {
      // the solve's accuracy, ~1e-12 in log-ratio
      expect(Math.abs(x1.xA - x2.xA)).toBeLessThan(1e-10);
      expect(Math.abs(x1.xB - x2.xC)).toBeLessThan(1e-10);
      expect(Math.abs(x1.xC - x2.xB)).toBeLessThan(1e-10);
    }
  });

  it('three equal pairs: three branches related by the permutations, each ending on a side of the three-phase triangle', () => {
    const branches = binodalBranches(model(SYM3), T);
    expect(branches.map((b) => b.edge)).toEqual(['AB', 'AC', 'BC']);
    expect(branches.map((b) => b.end)).toEqual(['triangle', 'triangle', 'triangle']);
    const table = binodalTable(model(SYM3), T, 3 * 10 + 2);
    // three branches of 10 rows, one #N/A row between them
    expect(table[10]).toBeUndefined();
    expect(table[21]).toBeUndefined();
    const ab = table.slice(0, 10) as TieEnds[], ac = table.slice(11, 21) as TieEnds[];
    for (let n = 0; n < 10; n++) {
      // A–C rows are A–B rows with B and C exchanged (solve accuracy ~1e-12; triangle corners ~1e-10)
      expect(Math.abs(ac[n][0].xA - ab[n][0].xA)).toBeLessThan(1e-9);
      expect(Math.abs(ac[n][0].xC - ab[n][0].xB)).toBeLessThan(1e-9);
      expect(Math.abs(ac[n][1].xC - ab[n][1].xB)).toBeLessThan(1e-9);
    }
    // the last row of a branch is a triangle side: A-rich and B-rich corners, both with the same x_C
    const side = ab[9];
    expect(Math.abs(side[0].xC - side[1].xC)).toBeLessThan(1e-9);
    expect(side[0].xA).toBeGreaterThan(0.5);
    expect(side[1].xB).toBeGreaterThan(0.5);
  });

  it('rows are evenly spaced along the curve (sum of both ends\' arc lengths)', () => {
    const rows = rowsOf(binodalTable(model(ONE_GAP), T, 30));
    const step = rows.slice(1).map((r, n) => Math.hypot(r[0].xA - rows[n][0].xA, r[0].xB - rows[n][0].xB, r[0].xC - rows[n][0].xC)
      + Math.hypot(r[1].xA - rows[n][1].xA, r[1].xB - rows[n][1].xB, r[1].xC - rows[n][1].xC));
    const mean = step.reduce((a, v) => a + v, 0) / step.length;
    // chords of a curved arc and a corrector that moves off the predicted point: within 5 %
    // (common practice, no published source)
    for (const d of step) expect(Math.abs(d - mean) / mean).toBeLessThan(0.05);
  });

  it('one branch fills every row', () => {
    const table = binodalTable(model(ONE_GAP), T, 60);
    expect(table).toHaveLength(60);
    expect(table.every((r) => r !== undefined)).toBe(true);
    const single = binodalTable(model(SYM_BC), T, 3);
    expect(single).toHaveLength(3);
  });

  it('refuses what it cannot answer', () => {
    // no edge has a gap
    expect(failureReason(() => binodalTable(model({ AB: [term(1)], AC: [term(1)], BC: [term(1)] }), T, 20))).toBe('none');
    // three branches need 8 rows
    expect(failureReason(() => binodalTable(model(SYM3), T, 7))).toBe('range');
    expect(failureReason(() => binodalTable(model(ONE_GAP), -1, 20))).toBe('range');
  });

  it('NRTL and Flory–Huggins: the edge row is the binary gap of the pair, and every row a true split of the spec g', () => {
    // Invented: an NRTL A–B pair with a gap; a solvent / non-solvent / polymer (N_C = 200) bath whose
    // polymer-lean phase on the A–C edge holds ~1e-47 of polymer.
    const NR: Nrtl3 = { a12: 2.0, b12: 0, a21: 1.5, b21: 0, a13: 0.2, b13: 0, a31: 0.3, b31: 0, a23: -0.2, b23: 0, a32: 0.1, b32: 0, alpha12: 0.2, alpha13: 0.3, alpha23: 0.3 };
    const FH: Fh3 = { NA: 1, NB: 1, NC: 200, chiAB: { A: 0.4, B: 0 }, chiAC: { A: 0.9, B: 150 }, chiBC: { A: 0.35, B: 0 } };
    const cases = [
      { model: ternaryNrtl(NR), g: (a: number, b: number, c: number) => nrtl3G(NR, T, a, b, c), N: [1, 1, 1], edge: nrtl({ a12: 2.0, b12: 0, a21: 1.5, b21: 0, alpha: 0.2 }), x: (p: TernaryPoint) => p.xB },
      { model: ternaryFloryHuggins(FH), g: (a: number, b: number, c: number) => fh3G(FH, T, a, b, c), N: [1, 1, 200], edge: floryHuggins({ NA: 1, NB: 200, A: 0.9, B: 150 }), x: (p: TernaryPoint) => p.xC },
    ];
    for (const { model: m, g, N, edge, x } of cases) {
      const rows = rowsOf(binodalTable(m, T, 16));
      const gap = gapAt(edge, T, 1);
      // the same binary equilibrium solved twice, ~1e-12 in log-ratio
      expect(Math.abs(x(rows[0][0]) - gap.low.x) / gap.low.x).toBeLessThan(1e-9);
      expect(Math.abs(x(rows[0][1]) - gap.high.x) / gap.high.x).toBeLessThan(1e-9);
      // mu_i per molecule from the spec's g (per site for Flory–Huggins, times N_i): the ideal part
      // RT (ln x_i + 1 - N_i sum_j x_j / N_j) in closed form, the rest by central differences (1e-6)
      const mu = (v: number[]) => {
        // x ln x taken as 0 at x <= 0, as spec3.ts does: g_E is then the smooth excess part at the
        // central-difference points just outside the triangle too (the spec: any extension gives the same mu)
        const ideal = (a: number, b: number, c: number) => R_SPEC * T * [a, b, c].reduce((s, xi, k) => s + (xi > 0 ? xi * Math.log(xi) : 0) / N[k], 0);
        const gE = (a: number, b: number, c: number) => g(a, b, c) - ideal(a, b, c);
        const d = [0, 1, 2].map((j) => {
          const up = [...v], dn = [...v];
          up[j] += 1e-6; dn[j] -= 1e-6;
          return (gE(up[0], up[1], up[2]) - gE(dn[0], dn[1], dn[2])) / 2e-6;
        });
        const e = gE(v[0], v[1], v[2]) - (v[0] * d[0] + v[1] * d[1] + v[2] * d[2]);
        const per = v.reduce((s, xi, k) => s + xi / N[k], 0);
        return [0, 1, 2].map((i) => N[i] * (e + d[i]) + RT * (Math.log(v[i]) + 1 - N[i] * per));
      };
      // the ideal part is exact, so dilute ends are checked too (only the edge row is left out)
      const checked = rows.filter((r) => r.every((pt) => frac(pt).every((v) => v > 0))).filter((r) => r[0] !== r[1]);
      expect(checked.length).toBeGreaterThan(10);
      for (const [p, q] of checked) {
        const m1 = mu(frac(p)), m2 = mu(frac(q));
        // solve at 1e-11 RT per site; differences of g_E times N_C = 200 add ~2e-8 RT
        for (let i = 0; i < 3; i++) expect(Math.abs(m1[i] - m2[i]) / RT, `mu_${'ABC'[i]}`).toBeLessThan(1e-6);
      }
    }
  });
});
