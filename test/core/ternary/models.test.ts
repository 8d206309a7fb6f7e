/**
 * Ternary models: g, gradient and Hessian in (x_B, x_C) and the chemical potentials against the
 * spec's formulas differentiated symbolically by mathjs (36-digit decimals); each edge against the
 * binary model of its pair; Gibbs–Duhem.
 */
import type { BigNumber, EvalFunction } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { muA, muB } from '../../../src/core/model';
import { floryHuggins } from '../../../src/core/models/floryHuggins';
import { nrtl } from '../../../src/core/models/nrtl';
import { redlichKister } from '../../../src/core/models/redlichKister';
import { ternaryFloryHuggins } from '../../../src/core/ternary/floryHuggins';
import { G, GB, GC, HBB, HBC, HCC, LOCAL_SIZE, MUA, MUB, MUC, perMolecule, type TernaryModel } from '../../../src/core/ternary/model';
import { ternaryNrtl } from '../../../src/core/ternary/nrtl';
import { ternaryRedlichKister } from '../../../src/core/ternary/redlichKister';
import { failureReason } from '../support/compare';
import { R_SPEC, type RkTerm } from '../support/spec';
import { big, exact } from '../support/symbolic';
import { fh3G, fh3Text, nrtl3G, nrtl3Text, rk3G, rk3Text, type Fh3, type GText3, type Nrtl3, type Rk3 } from './spec3';

// Invented parameter sets (our own numbers).
export const RK: Rk3 = {
  AB: [{ a: 12000, b: -3, c: 0 }, { a: 2500, b: 0, c: 0.4 }],
  AC: [{ a: 8000, b: 0, c: 0 }, { a: -1500, b: 1, c: 0 }, { a: 700, b: 0, c: 0 }],
  BC: [{ a: 15000, b: 2, c: -0.5 }, { a: 0, b: 0, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 900, b: 0, c: 0 }],
  ternary: { A: { a: 5000, b: -1, c: 0 }, B: { a: -3000, b: 0, c: 0.2 }, C: { a: 1000, b: 0, c: 0 } },
};
export const NRTL: Nrtl3 = {
  a12: 0.5, b12: 400, a21: -0.2, b21: 250,
  a13: 2.5, b13: 0, a31: 1.2, b31: 100,
  a23: -1.1, b23: 600, a32: 3, b32: -300,
  alpha12: 0.3, alpha13: 0.2, alpha23: 0.47,
};
export const FH: Fh3 = { NA: 1, NB: 250, NC: 2.5, chiAB: { A: 0.3, B: 50 }, chiAC: { A: 1.2, B: 100 }, chiBC: { A: 0.5, B: -60 } };

const MODELS: Array<{ name: string; model: TernaryModel; text: GText3; g: (T: number, a: number, b: number, c: number) => number; scale: number }> = [
  // scale: the size of the model's coefficients in units of RT (rounding floor where parts vanish)
  { name: 'Redlich–Kister + Muggianu + ternary term', model: ternaryRedlichKister(RK), text: rk3Text(RK), g: (T, a, b, c) => rk3G(RK, T, a, b, c), scale: 20 },
  { name: 'NRTL', model: ternaryNrtl(NRTL), text: nrtl3Text(NRTL), g: (T, a, b, c) => nrtl3G(NRTL, T, a, b, c), scale: 20 },
  { name: 'Flory–Huggins', model: ternaryFloryHuggins(FH), text: fh3Text(FH), g: (T, a, b, c) => fh3G(FH, T, a, b, c), scale: 5 },
];

// Dyadic compositions: x_A = 1 - x_B - x_C is exact in doubles, so the core and the decimal
// reference see the same point; they include each component at 2^-20 (about 1e-6).
const e = 2 ** -20;
const POINTS: Array<[number, number, number]> = [
  [0.25, 0.25, 0.5], [0.5, 0.125, 0.375], [0.125, 0.75, 0.125],
  [0.5 - e, e, 0.5], [0.5 - e, 0.5, e], [e, 0.5, 0.5 - e], [1 - 2 * e, e, e],
];
// one temperature: every T-dependent term (b T, c T ln T, B/T) is nonzero there; a second would double
// the 36-digit evaluation time for no new term
const TS = [410];

type Big = BigNumber;

function compile(text: string) {
  const g = big.parse(text);
  const gB = big.derivative(g, 'xB', { simplify: false }), gC = big.derivative(g, 'xC', { simplify: false });
  const hBB = big.derivative(gB, 'xB', { simplify: false }), hBC = big.derivative(gB, 'xC', { simplify: false });
  const hCC = big.derivative(gC, 'xC', { simplify: false });
  return [g, gB, gC, hBB, hBC, hCC].map((n) => n.compile());
}

function evalAll(fs: EvalFunction[], xB: number, xC: number, T: number): Big[] {
  const scope = { xB: exact(xB), xC: exact(xC), T: exact(T) };
  return fs.map((f) => f.evaluate(scope) as Big);
}

describe('ternary models against symbolic differentiation of the spec', () => {
  for (const { name, model, text, g, scale } of MODELS) {
    it(name, () => {
      const ideal = compile(text.ideal), excess = compile(text.excess);
      const out = new Float64Array(LOCAL_SIZE);
      for (const T of TS) {
        const iso = model.at(T), RT = R_SPEC * T;
        for (const [xA, xB, xC] of POINTS) {
          const I = evalAll(ideal, xB, xC, T), E = evalAll(excess, xB, xC, T);
          const want = I.map((v, k) => big.add(v, E[k]) as Big);
          // mu from the reduced variables: mu_A = g - xB gB - xC gC, mu_B = mu_A + gB, mu_C = mu_A + gC
          const muAref = big.subtract(want[0], big.add(big.multiply(exact(xB), want[1]), big.multiply(exact(xC), want[2]))) as Big;
          const muRef = [muAref, big.add(muAref, want[1]) as Big, big.add(muAref, want[2]) as Big];
          iso.local(xA, xB, xC, out);
          const got = [out[G], out[GB], out[GC], out[HBB], out[HBC], out[HCC]];
          const labels = ['g', 'dg/dxB', 'dg/dxC', 'd2g/dxB2', 'd2g/dxBdxC', 'd2g/dxC2'];
          for (let k = 0; k < 6; k++) {
            const w = big.number(want[k]) as number;
            const size = Math.abs(big.number(I[k]) as number) + Math.abs(big.number(E[k]) as number) + scale * RT;
            // The core rounds at a few 2.2e-16 of the larger part; 1e-12 of the parts' size leaves
            // room for the ~1e3 terms' rounding and is far below any wrong term.
            expect(Math.abs(got[k] - w), `${name} ${labels[k]} at (${xA}, ${xB}, ${xC}), T = ${T}: got ${got[k]}, want ${w}`).toBeLessThanOrEqual(1e-12 * size);
          }
          const size = Math.abs(big.number(want[0]) as number) + Math.abs(big.number(want[1]) as number) + Math.abs(big.number(want[2]) as number) + scale * RT;
          for (let i = 0; i < 3; i++) {
            const w = big.number(muRef[i]) as number, gotMu = out[MUA + i];
            // mu_i = RT ln x_i + ... reaches 14 RT at 2^-20; 1e-12 of the sizes as above
            expect(Math.abs(gotMu - w), `${name} mu_${'ABC'[i]} at (${xA}, ${xB}, ${xC}), T = ${T}`).toBeLessThanOrEqual(1e-12 * (size + Math.abs(w)));
          }
          // the spec's g written as plain arithmetic (spec3.ts) agrees with the decimal reference
          expect(Math.abs(g(T, xA, xB, xC) - (big.number(want[0]) as number))).toBeLessThanOrEqual(1e-12 * (Math.abs(big.number(I[0]) as number) + scale * RT));
        }
      }
    });
  }
});

describe('Gibbs–Duhem and the sum rule', () => {
  // Gibbs–Duhem: sum_i x_i dmu_i = 0 at fixed T (any textbook of solution thermodynamics, e.g.
  // Prausnitz, Lichtenthaler & de Azevedo, Molecular Thermodynamics of Fluid-Phase Equilibria (1999) eq. 6-12).
  for (const { name, model } of MODELS) {
    it(`${name}: sum x_i mu_i = g and sum x_i dmu_i = 0 along two directions`, () => {
      const iso = model.at(380), o = new Float64Array(LOCAL_SIZE), p = new Float64Array(LOCAL_SIZE), m = new Float64Array(LOCAL_SIZE);
      for (const [xA, xB, xC] of [[0.2, 0.3, 0.5], [0.6, 0.1, 0.3], [0.05, 0.9, 0.05]]) {
        iso.local(xA, xB, xC, o);
        const sum = xA * o[MUA] + xB * o[MUB] + xC * o[MUC];
        // sum of three terms of size ~|mu_i| x_i: rounding a few 1e-16 of RT-sized terms
        expect(Math.abs(sum - o[G])).toBeLessThan(1e-12 * iso.RT);
        for (const [dB, dC] of [[1, 0], [0.3, -0.7]]) {
          const h = 1e-5;
          iso.local(xA - h * (dB + dC), xB + h * dB, xC + h * dC, p);
          iso.local(xA + h * (dB + dC), xB - h * dB, xC - h * dC, m);
          let gd = 0, size = 0;
          for (let i = 0; i < 3; i++) {
            const x = [xA, xB, xC][i], dmu = p[MUA + i] - m[MUA + i];
            gd += x * dmu;
            size += Math.abs(x * dmu);
          }
          // central differences: truncation ~(h / x_min)^2 = 1e-8 of each dmu (x_min = 0.05),
          // rounding ~1e-16 |mu| / |dmu| ~ 1e-9; 1e-7 of the terms' size sits above both and far
          // below the O(1) imbalance of a wrong mu
          expect(Math.abs(gd), `${name} at (${xA}, ${xB}, ${xC}) along (${dB}, ${dC})`).toBeLessThan(1e-7 * size);
        }
      }
    });
  }
});

/** g and mu of the ternary model on an edge (third fraction absent: 0 for g, 1e-300 for mu). */
function onEdge(model: TernaryModel, T: number, pair: 'AB' | 'AC' | 'BC', xi: number, xj: number) {
  const put = (i: number, j: number, k: number) => {
    const v = [0, 0, 0];
    v[['AB', 'AC', 'BC'].indexOf(pair) === 2 ? 1 : 0] = i; // i is A, or B for BC
    v[pair === 'AB' ? 1 : 2] = j;
    v[pair === 'AB' ? 2 : pair === 'AC' ? 1 : 0] = k;
    return v as [number, number, number];
  };
  const iso = model.at(T), o = new Float64Array(LOCAL_SIZE);
  const g = iso.g(...put(xi, xj, 0));
  iso.local(...put(xi, xj, 1e-300), o);
  const slot = { AB: [MUA, MUB], AC: [MUA, MUC], BC: [MUB, MUC] }[pair];
  return { g, mui: o[slot[0]], muj: o[slot[1]], x: put(xi, xj, 1e-300) };
}

describe('each edge is the binary model of its pair', () => {
  const Ts = [320, 510];
  const XS = [1e-9, 0.1, 0.37, 0.5, 0.8, 1 - 1e-7];
  const rkBinary = (terms: RkTerm[]) => redlichKister(terms);
  const cases: Array<{ name: string; model: TernaryModel; edges: Record<'AB' | 'AC' | 'BC', ReturnType<typeof rkBinary>> }> = [
    { name: 'Redlich–Kister', model: ternaryRedlichKister(RK), edges: { AB: redlichKister(RK.AB), AC: redlichKister(RK.AC), BC: redlichKister(RK.BC) } },
    {
      name: 'NRTL', model: ternaryNrtl(NRTL), edges: {
        AB: nrtl({ a12: NRTL.a12, b12: NRTL.b12, a21: NRTL.a21, b21: NRTL.b21, alpha: NRTL.alpha12 }),
        AC: nrtl({ a12: NRTL.a13, b12: NRTL.b13, a21: NRTL.a31, b21: NRTL.b31, alpha: NRTL.alpha13 }),
        BC: nrtl({ a12: NRTL.a23, b12: NRTL.b23, a21: NRTL.a32, b21: NRTL.b32, alpha: NRTL.alpha23 }),
      },
    },
    {
      name: 'Flory–Huggins', model: ternaryFloryHuggins(FH), edges: {
        AB: floryHuggins({ NA: FH.NA, NB: FH.NB, ...FH.chiAB }),
        AC: floryHuggins({ NA: FH.NA, NB: FH.NC, ...FH.chiAC }),
        BC: floryHuggins({ NA: FH.NB, NB: FH.NC, ...FH.chiBC }),
      },
    },
  ];
  for (const { name, model, edges } of cases) {
    it(`${name}: g, mu_i and mu_j on the edges A–B, A–C, B–C`, () => {
      for (const T of Ts) {
        for (const pair of ['AB', 'AC', 'BC'] as const) {
          const bin = edges[pair].at(T);
          for (const x of XS) {
            const y = 1 - x;
            const t = onEdge(model, T, pair, y, x);
            const scale = Math.abs(bin.g(x, y)) + T * R_SPEC;
            // the same formula term by term in another order: a few ulp of the terms
            expect(Math.abs(t.g - bin.g(x, y)), `${name} ${pair} g at x = ${x}, T = ${T}`).toBeLessThan(1e-13 * scale);
            const mA = muA(bin, x, y), mB = muB(bin, x, y);
            // mu_i = RT ln x_i + ...: rounding of terms up to ~20 RT, 1e-13 of them
            expect(Math.abs(t.mui - mA), `${name} ${pair} mu_i at x = ${x}, T = ${T}`).toBeLessThan(1e-13 * (Math.abs(mA) + 20 * scale));
            expect(Math.abs(t.muj - mB), `${name} ${pair} mu_j at x = ${x}, T = ${T}`).toBeLessThan(1e-13 * (Math.abs(mB) + 20 * scale));
          }
        }
      }
    });
  }

  it('Redlich–Kister: an edge read in the other order is the binary model with its odd terms negated', () => {
    // (x_i - x_j)^k = (-1)^k (x_j - x_i)^k: the spec's sign convention for odd terms
    const flipped = redlichKister(RK.AC.map((t, k) => (k % 2 ? { a: -t.a, b: -t.b, c: -t.c } : t)));
    const model = ternaryRedlichKister(RK), T = 420;
    for (const x of [0.15, 0.6]) {
      // binary with C as its A and A as its B: x = x_A
      const bin = flipped.at(T), t = onEdge(model, T, 'AC', x, 1 - x);
      expect(Math.abs(t.g - bin.g(x, 1 - x))).toBeLessThan(1e-13 * (Math.abs(t.g) + R_SPEC * T));
      const unflipped = redlichKister(RK.AC).at(T);
      // and the same binary without the flip differs (so the check above can fail)
      expect(Math.abs(t.g - unflipped.g(x, 1 - x))).toBeGreaterThan(1);
    }
  });

  it('Flory–Huggins per molecule: N_i mu_i is Flory\'s chemical potential of the binary edge', () => {
    // Flory (1953), Principles of Polymer Chemistry, ch. XII:
    // Mu_A/RT = ln(1-phi) + (1 - N_A/N_B) phi + chi N_A phi^2, Mu_B/RT = ln phi + (1 - N_B/N_A)(1-phi) + chi N_B (1-phi)^2
    const model = ternaryFloryHuggins(FH), T = 350, chi = FH.chiAB.A + FH.chiAB.B / T, RT = R_SPEC * T;
    const out = new Float64Array(3);
    for (const phi of [1e-6, 0.2, 0.7]) {
      perMolecule(model, model.at(T), 1 - phi, phi, 1e-300, out);
      const MuA = RT * (Math.log(1 - phi) + (1 - FH.NA / FH.NB) * phi + chi * FH.NA * phi * phi);
      const MuB = RT * (Math.log(phi) + (1 - FH.NB / FH.NA) * (1 - phi) + chi * FH.NB * (1 - phi) ** 2);
      // terms up to N_B RT = 250 RT: 1e-13 of that size
      expect(Math.abs(out[0] - MuA)).toBeLessThan(1e-13 * 300 * RT);
      expect(Math.abs(out[1] - MuB)).toBeLessThan(1e-13 * 300 * RT);
    }
  });
});

describe('the ternary term', () => {
  it('M_A = M_B = M_C = M adds M x_A x_B x_C (the spec: "a single constant ternary term")', () => {
    // x_A x_B x_C (x_A M + x_B M + x_C M) = M x_A x_B x_C since x_A + x_B + x_C = 1
    const M = { a: 4200, b: -2, c: 0.3 }, T = 350, Mv = M.a + M.b * T + M.c * T * Math.log(T);
    const without = ternaryRedlichKister({ ...RK, ternary: undefined }).at(T);
    const withM = ternaryRedlichKister({ ...RK, ternary: { A: M, B: M, C: M } }).at(T);
    for (const [a, b, c] of [[0.25, 0.25, 0.5], [0.125, 0.75, 0.125]]) {
      // a few ulp of g's terms (~1e4 J/mol)
      expect(Math.abs(withM.g(a, b, c) - without.g(a, b, c) - Mv * a * b * c)).toBeLessThan(1e-10);
    }
  });
});

describe('dilute compositions keep their digits', () => {
  it('a polymer-lean phase at phi_B = 1e-40: mu_B = RT(ln phi_B / N_B ...) per site, N_B mu_B per molecule', () => {
    // The spec's mu_i = g + sum_j (delta_ij - x_j) dg/dx_j worked out by hand for g/RT = sum (phi_i/N_i) ln phi_i
    // + sum chi_ij phi_i phi_j (common practice, no published source):
    // N_B mu_B/RT = ln phi_B + 1 - N_B sum_j phi_j/N_j + N_B (chi_AB phi_A + chi_BC phi_C - g_E/RT), here at phi_B -> 0
    const model = ternaryFloryHuggins(FH), T = 300, iso = model.at(T), RT = R_SPEC * T;
    const chi = (c: { A: number; B: number }) => c.A + c.B / T;
    const a = 0.4, c = 0.6, b = 1e-40;
    const out = new Float64Array(3);
    perMolecule(model, iso, a, b, c, out);
    const want = RT * (Math.log(b) + 1 - FH.NB * (a / FH.NA + c / FH.NC) + FH.NB * (chi(FH.chiAB) * a + chi(FH.chiBC) * c - chi(FH.chiAC) * a * c));
    // ln(1e-40) = -92: its digits survive; terms up to ~N_B RT (250 RT), rounding 1e-13 of that
    expect(Math.abs(out[1] - want)).toBeLessThan(1e-13 * 300 * RT);
  });

  it('refuses bad parameters', () => {
    expect(failureReason(() => ternaryFloryHuggins({ ...FH, NB: 0.5 }))).toBe('input');
    expect(failureReason(() => ternaryNrtl({ ...NRTL, alpha13: 0 }))).toBe('input');
    expect(failureReason(() => ternaryRedlichKister({ ...RK, AB: [{ a: NaN, b: 0, c: 0 }] }))).toBe('input');
  });
});
