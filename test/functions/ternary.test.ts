/**
 * The three-component cell functions (src/functions/ternary.ts) through the cell layer, the
 * embedded formula engine and `mixgap eval --json`, with checks from outside the project:
 * every edge against the binary functions, equal chemical potentials across each returned
 * tie-line or triangle, lever-rule mass balances, published closed forms of the multicomponent
 * NRTL and Flory–Huggins activities, a closed-form plait point, and bad-input rows.
 * Scenarios and numbers are invented (water / an invented solvent / an invented solute; a
 * non-solvent / solvent / polymer casting bath).
 */
import { spawnSync } from 'child_process';
import { existsSync } from 'fs';
import path from 'path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { R } from '../../src/core/constants';
import { crossCurrent } from '../../src/core/ternary/extraction';
import { readTernaryCard } from '../../src/functions/ternaryCard';
import { CellFailure } from '../../src/functions/errors';
import * as bin from '../../src/functions/functions';
import { molarMass } from '../../src/functions/fitting';
import * as t from '../../src/functions/ternary';
import { evaluateFormulas, type FormulaResult } from '../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import { failure } from './support/failure';
import { generatedMetadata, inlineArray as inline } from './support/evaluate';

const root = path.join(__dirname, '..', '..');

type Cell = string | number;

// water (A) / an invented solvent (B) / an invented solute (C), Redlich–Kister, J/mol
const RK: Cell[][] = [
  ['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 2000], ['BC.L0', -1000],
  ['name A', 'water'], ['name B', 'solvent'], ['name C', 'solute'],
];
// the same kind of system in NRTL (tau = b / T)
const NRTL: Cell[][] = [
  ['model', 'nrtl'], ['AB.b12', 900], ['AB.b21', 700], ['AB.alpha', 0.2],
  ['AC.b12', 100], ['AC.b21', 50], ['AC.alpha', 0.3], ['BC.b12', -100], ['BC.b21', -50], ['BC.alpha', 0.3],
];
// non-solvent (A) / solvent (B) / polymer (C, 200 sites): a casting bath
const FH: Cell[][] = [
  ['model', 'fh'], ['NA', 1], ['NB', 1], ['NC', 200], ['AB.chi.A', 0.4], ['AC.chi.A', 1.5], ['BC.chi.A', 0.3],
];
const T = 300;
const CARDS = [
  { name: 'redlich-kister', card: RK, feed: [0.4, 0.1] },
  { name: 'nrtl', card: NRTL, feed: [0.4, 0.1] },
  { name: 'flory-huggins', card: FH, feed: [0.3, 0.1] },
];

/** What a cell shows for a direct call: its value, or the error. */
function shown(f: () => unknown): unknown {
  try {
    const v = f();
    return Array.isArray(v) ? v.map((row: unknown[]) => row.map((c) => (c instanceof CellFailure ? { error: c.code, message: c.message } : c))) : v;
  } catch (e) {
    if (e instanceof CellFailure) return { error: e.code, message: e.message };
    throw e;
  }
}

/**
 * The same numbers, bit for bit (a split depends on its arguments only: the samples a solve adds
 * are dropped before the next one, see order-independence-more.test.ts), equal anything else.
 */
function expectSame(got: unknown, want: unknown, what: string): void {
  if (typeof want === 'number' && typeof got === 'number') {
    if (!Object.is(got, want)) expect.fail(`${what}: got ${got}, want ${want}`);
    return;
  }
  if (Array.isArray(want) && Array.isArray(got)) {
    expect(got.length, what).toBe(want.length);
    want.forEach((w, i) => expectSame(got[i], w, `${what} [${i}]`));
    return;
  }
  expect(got, what).toEqual(want);
}

const split = (card: Cell[][], xB: number, xC: number, TK = T) => t.tSplit(xB as any, xC as any, TK, card as any).filter((r) => r[0] !== '') as number[][];
const chemPots = (card: Cell[][], p: number[], TK = T) => ['A', 'B', 'C'].map((c) => t.tChemPot(c, [[p[0], p[1], p[2]]], null as any, TK, card as any));

describe('splits: equal chemical potentials, fractions summing to 1, closed mass balance', () => {
  for (const { name, card, feed } of CARDS) {
    it(name, () => {
      const rows = split(card, feed[0], feed[1]);
      expect(t.tPhases(feed[0] as any, feed[1] as any, T, card as any)).toBe(rows.length);
      expect(rows.length).toBe(2);
      // phase order of the ternary conventions: increasing x_C
      expect(rows[0][2]).toBeLessThan(rows[1][2]);
      // fractions sum to 1: the split scales clipped fractions to their sum, so a few ulp
      expect(Math.abs(rows[0][3] + rows[1][3] - 1)).toBeLessThan(1e-14);
      // lever rule (mass balance): sum_k f_k x_k = z; the split solves det[x'; x''; z] = 0 to 1e-12 relative
      const z = [1 - feed[0] - feed[1], feed[0], feed[1]];
      for (let i = 0; i < 3; i++) expect(Math.abs(rows[0][3] * rows[0][i] + rows[1][3] * rows[1][i] - z[i])).toBeLessThan(1e-11);
      // Gibbs (1876), equilibrium of heterogeneous substances: equal chemical potential of each
      // component in coexisting phases. Newton stops at 1e-10 of RT; 1e-8 RT leaves room for N_i = 200.
      const mu1 = chemPots(card, rows[0]), mu2 = chemPots(card, rows[1]);
      for (let i = 0; i < 3; i++) expect(Math.abs(mu1[i] - mu2[i])).toBeLessThan(1e-8 * R * T);
      // K_i = x_i'' / x_i' and S_ij = K_i / K_j (ternary conventions)
      const K = [0, 1, 2].map((i) => rows[1][i] / rows[0][i]);
      ['A', 'B', 'C'].forEach((c, i) => expect(t.tDist(c, feed[0] as any, feed[1] as any, T, card as any)).toBe(K[i]));
      expect(t.tSelect('C', 'A', feed[0] as any, feed[1] as any, T, card as any)).toBe(K[2] / K[0]);
    });
  }

  it('a one-phase feed gives one row with fraction 1, then two empty rows', () => {
    const r = t.tSplit(0.005 as any, 0.05 as any, T, RK as any);
    // the feed itself (x_A = 1 - 0.005 - 0.05 in floating point)
    expect(r[0]).toEqual([1 - 0.005 - 0.05, 0.005, 0.05, 1]);
    expect(r.slice(1)).toEqual([['', '', '', ''], ['', '', '', '']]);
  });

  it('mass basis: K from the mole-basis phases converted with the molar masses', () => {
    const M = [18.015, 120, 60];
    const rows = split(RK, 0.4, 0.1);
    const w = rows.map((p) => {
      const m = [p[0] * M[0], p[1] * M[1], p[2] * M[2]], s = m[0] + m[1] + m[2];
      return m.map((v) => v / s);
    });
    // definition of the mass fraction w_i = x_i M_i / sum_j x_j M_j; the same arithmetic in another order: 1e-14
    expect(t.tDist('solute', 0.4 as any, 0.1 as any, T, RK as any, [M] as any)).toBeCloseTo(w[1][2] / w[0][2], 13);
    // formulas give their molar masses (IUPAC 2021 standard atomic weights, as MOLARMASS)
    const byFormula = t.tDist('C', 0.4 as any, 0.1 as any, T, RK as any, [['H2O', 'C8H18', 'C2H4O2']] as any);
    const byNumber = t.tDist('C', 0.4 as any, 0.1 as any, T, RK as any, [['H2O', 'C8H18', 'C2H4O2'].map((f) => molarMass(f))] as any);
    expect(byFormula).toBe(byNumber);
  });
});

describe('cross-current stages by chaining TSPLIT in cells', () => {
  it('three stages of fresh solvent: the chained cells give the core cross-current cascade, balances closed', () => {
    // feed: 100 mol of water with 10 % solute; each stage adds 40 mol of pure solvent (B)
    const feed = { amount: 100, x: { xA: 0.9, xB: 0, xC: 0.1 } }, solvent = { xA: 0, xB: 1, xC: 0 };
    const core = crossCurrent(readTernaryCard(RK).model, T, feed, solvent, [40, 40, 40]);
    let raff = feed.amount, x = [feed.x.xA, feed.x.xB, feed.x.xC];
    let soluteOut = 0;
    for (let k = 0; k < 3; k++) {
      // what a user writes in cells: the mixture, its split, the raffinate (the phase poorer in solvent B)
      const M = raff + 40, z = [raff * x[0] / M, (raff * x[1] + 40) / M, raff * x[2] / M];
      const rows = split(RK, z[1], z[2]);
      const r = rows[0][1] < rows[1][1] ? 0 : 1;
      const e = 1 - r;
      // lever rule in cells: the solute balance of the stage closes (mass balance, 1e-11 as above)
      expect(Math.abs(M * (rows[r][3] * rows[r][2] + rows[e][3] * rows[e][2]) - M * z[2])).toBeLessThan(1e-11 * M);
      soluteOut += M * rows[e][3] * rows[e][2];
      // the core cascade (src/core/ternary/extraction.ts) computes the same stage: Newton's last bits, 1e-12
      expect(rows[r][2]).toBeCloseTo(core[k].raffinate.x.xC, 12);
      expect(M * rows[r][3]).toBeCloseTo(core[k].raffinate.amount, 9);
      raff = M * rows[r][3];
      x = rows[r].slice(0, 3);
    }
    // overall solute balance: feed solute = raffinate solute + extract solute, to rounding of the sums
    expect(Math.abs(feed.amount * feed.x.xC - (raff * x[2] + soluteOut))).toBeLessThan(1e-10);
  });
});

describe('each edge gives what the binary functions give for that pair', () => {
  // ternary conventions: with the third component absent the model is the binary one of the pair
  // (A as its A for AB and AC, B as its A for BC); the binary functions are the check.
  const edge = (pair: string): Cell[][] => [
    ['model', 'rk'], ...RK.filter(([k]) => String(k).startsWith(`${pair}.`)).map(([k, v]) => [String(k).slice(3), v]),
  ];
  const at = (pair: string, x: number): [number, number] =>
    pair === 'AB' ? [x, 0] : pair === 'AC' ? [0, x] : [1 - x, x];
  for (const pair of ['AB', 'AC', 'BC']) {
    it(`${pair}: TGMIX on the edge equals GMIX of the pair's card`, () => {
      for (const x of [0.01, 0.3, 0.5, 0.77]) {
        const [xB, xC] = at(pair, x);
        // the same products and sums: equal to 1 ulp of the largest term (RT ln 2)
        expect(Math.abs(t.tGMix(xB as any, xC as any, T, RK as any) - bin.gMix(x, T, edge(pair) as any))).toBeLessThan(1e-12 * R * T);
      }
    });
  }

  it('AB: a feed 1e-12 off the edge splits into the binary gap (GAPLOW, GAPHIGH)', () => {
    const rows = split(RK, 0.5, 1e-12);
    const low = bin.gapLow(T, edge('AB') as any), high = bin.gapHigh(T, edge('AB') as any);
    // 1e-12 of solute moves the tie-line ends by about 1e-12 times K: 1e-9 is ample
    expect(rows[0][1]).toBeCloseTo(low, 9);
    expect(rows[1][1]).toBeCloseTo(high, 9);
  });
});

describe('activities: published multicomponent closed forms', () => {
  it('NRTL: Renon & Prausnitz (1968), AIChE J. 14, 135, multicomponent ln gamma_i', () => {
    const x = [0.5, 0.2, 0.3];
    const b: Record<string, number> = { 12: 900, 21: 700, 13: 100, 31: 50, 23: -100, 32: -50 };
    const al: Record<string, number> = { 12: 0.2, 21: 0.2, 13: 0.3, 31: 0.3, 23: 0.3, 32: 0.3 };
    const tau = (j: number, i: number) => (i === j ? 0 : b[`${j + 1}${i + 1}`] / T);
    const G = (j: number, i: number) => (i === j ? 1 : Math.exp(-al[`${j + 1}${i + 1}`] * tau(j, i)));
    const lnGamma = (i: number) => {
      const sum = (f: (k: number) => number) => f(0) + f(1) + f(2);
      let v = sum((j) => tau(j, i) * G(j, i) * x[j]) / sum((k) => G(k, i) * x[k]);
      for (let j = 0; j < 3; j++) {
        const Dj = sum((k) => G(k, j) * x[k]);
        v += ((x[j] * G(i, j)) / Dj) * (tau(i, j) - sum((m) => x[m] * tau(m, j) * G(m, j)) / Dj);
      }
      return v;
    };
    ['A', 'B', 'C'].forEach((c, i) => {
      // the same quantity from g's derivatives instead of the closed form: 1e-12 relative
      expect(t.tActivity(c, [x] as any, null as any, T, NRTL as any)).toBeCloseTo(x[i] * Math.exp(lnGamma(i)), 12);
    });
  });

  it('Flory–Huggins: Tompa (1956), Polymer Solutions, ternary chemical potentials per molecule (from memory)', () => {
    // Delta mu_i / RT = ln phi_i + 1 - N_i sum_j phi_j / N_j + N_i (sum_j chi_ij phi_j - sum_{j<k} chi_jk phi_j phi_k)
    const phi = [0.3, 0.5, 0.2], N = [1, 1, 200];
    const chi = [[0, 0.4, 1.5], [0.4, 0, 0.3], [1.5, 0.3, 0]];
    const pairs = chi[0][1] * phi[0] * phi[1] + chi[0][2] * phi[0] * phi[2] + chi[1][2] * phi[1] * phi[2];
    const s = phi[0] / N[0] + phi[1] / N[1] + phi[2] / N[2];
    ['A', 'B', 'C'].forEach((c, i) => {
      const lnA = Math.log(phi[i]) + 1 - N[i] * s + N[i] * (chi[i][0] * phi[0] + chi[i][1] * phi[1] + chi[i][2] * phi[2] - pairs);
      // 1e-10 relative of the larger of mu and RT: N_C = 200 multiplies rounding of the per-site terms
      expect(Math.abs(t.tChemPot(c, [phi] as any, null as any, T, FH as any) - R * T * lnA)).toBeLessThan(1e-10 * R * T * Math.max(1, Math.abs(lnA)));
    });
  });

  it('Redlich–Kister: Euler, g = sum_i x_i mu_i (Gibbs–Duhem), and a_i = exp(mu_i / RT)', () => {
    const x = [0.2, 0.5, 0.3];
    const mu = ['A', 'B', 'C'].map((c) => t.tChemPot(c, [x] as any, null as any, T, RK as any));
    // standard thermodynamic identity (e.g. Prausnitz, Lichtenthaler & de Azevedo 1999, ch. 6, from memory); rounding of terms of size RT
    expect(Math.abs(x[0] * mu[0] + x[1] * mu[1] + x[2] * mu[2] - t.tGMix([x] as any, null as any, T, RK as any))).toBeLessThan(1e-11 * R * T);
    ['A', 'B', 'C'].forEach((c, i) => expect(t.tActivity(c, [x] as any, null as any, T, RK as any)).toBeCloseTo(Math.exp(mu[i] / (R * T)), 14));
  });
});

describe('plait points and three-phase triangles', () => {
  it('a B–C symmetric regular system: plait point at x_B = x_C = RT / L_BC (closed form)', () => {
    // g along x_B = t + d, x_C = t - d: d2g/dd2 = 2RT/t - 2 L_BC = 0 at d = 0; A ideal with B and C,
    // tie-lines parallel to the B–C edge by symmetry. Our derivation from the spec's g (common
    // practice, no published source). Tolerance: the plait Newton uses finite differences, 1e-6.
    const card: Cell[][] = [['model', 'rk'], ['AB.L0', 0], ['AC.L0', 0], ['BC.L0', 9000]];
    const [[xA, xB, xC]] = t.tPlait(T, card as any) as number[][];
    const tt = (R * T) / 9000;
    expect(xB).toBeCloseTo(tt, 6);
    expect(xC).toBeCloseTo(tt, 6);
    expect(xA).toBeCloseTo(1 - 2 * tt, 6);
    // tie-lines shrink toward it: a feed just below the plait point on the symmetry line splits, just above does not
    expect(t.tPhases(tt * 1.02 as any, tt * 1.02 as any, T, card as any)).toBe(2);
    expect(t.tPhases(tt * 0.98 as any, tt * 0.98 as any, T, card as any)).toBe(1);
    expect(failure(() => t.tPlait(T, card as any, 2)).code).toBe('#N/A');
  });

  it('equal pair terms: a three-phase triangle whose vertices are permutations of one another', () => {
    const card: Cell[][] = [['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 12000], ['BC.L0', 12000]];
    const tri = t.tTriangle(T, card as any) as number[][];
    expect(tri).toHaveLength(3);
    // symmetry under permuting A, B, C (the model is invariant): sorted fractions equal; 1e-9 of Newton's tolerance
    const sorted = tri.map((p) => [...p].sort((a, b) => a - b));
    for (let k = 1; k < 3; k++) for (let i = 0; i < 3; i++) expect(sorted[k][i]).toBeCloseTo(sorted[0][i], 9);
    // equal chemical potentials in all three phases (Gibbs), 1e-8 RT
    const mus = tri.map((p) => chemPots(card, p));
    for (let k = 1; k < 3; k++) for (let i = 0; i < 3; i++) expect(Math.abs(mus[k][i] - mus[0][i])).toBeLessThan(1e-8 * R * T);
    // a feed at the centre splits into the same three phases, fractions 1/3 by symmetry
    const rows = split(card, 1 / 3, 1 / 3);
    expect(rows).toHaveLength(3);
    for (const r of rows) expect(r[3]).toBeCloseTo(1 / 3, 9);
    expect(failure(() => t.tTriangle(T, RK as any)).code).toBe('#N/A');
  });
});

describe('bad inputs', () => {
  const rows: Array<[string, () => unknown, string, string]> = [
    ['feed outside the triangle', () => t.tSplit(0.7 as any, 0.4 as any, T, RK as any), '#NUM!', 'outside the composition triangle'],
    ['a negative fraction', () => t.tPhases(-0.1 as any, 0.4 as any, T, RK as any), '#NUM!', 'x_B = -0.1'],
    ['three cells not summing to 1', () => t.tPhases([[0.5, 0.4, 0.2]] as any, null as any, T, RK as any), '#NUM!', 'sum to 1.1'],
    ['a range and xC together', () => t.tPhases([[0.4, 0.1]] as any, 0.1 as any, T, RK as any), '#VALUE!', 'leave xC empty'],
    ['unknown component name', () => t.tDist('ethanol', 0.4 as any, 0.1 as any, T, RK as any), '#VALUE!', 'write "A", "B" or "C" (or water, solvent, solute)'],
    ['misspelled key', () => t.tPhases(0.4 as any, 0.1 as any, T, [...RK, ['BC.LO', 1]] as any), '#VALUE!', 'unknown key "BC.LO"'],
    ['a binary card', () => t.tPhases(0.4 as any, 0.1 as any, T, [['model', 'regular'], ['omega', 9000]] as any), '#VALUE!', 'not a ternary card'],
    ['no tie-line through a one-phase feed', () => t.tDist('C', 0.005 as any, 0.05 as any, T, RK as any), '#N/A', 'one phase'],
    ['a temperature below 0 K', () => t.tPhases(0.4 as any, 0.1 as any, -5, RK as any), '#NUM!', 'absolute zero'],
    ['two molar masses', () => t.tDist('C', 0.4 as any, 0.1 as any, T, RK as any, [[18, 60]] as any), '#VALUE!', 'molar masses of A, B and C'],
  ];
  it('a core failure names the temperature in the card\'s unit', () => {
    const e = failure(() => t.tDist('C', 0.005 as any, 0.05 as any, 26.85, [...RK, ['temperature', '°C']] as any));
    expect(e.code).toBe('#N/A');
    expect(e.message).toContain('is one phase at T = 26.85 °C');
  });
  for (const [what, f, code, text] of rows) {
    it(what, () => {
      const e = failure(f);
      expect(e.code).toBe(code);
      expect(e.message).toContain(text);
    });
  }
});

// ---------------------------------------------------------------------------------------------
// The same calls through the embedded engine and through `mixgap eval --json`

interface Check {
  formula: string;
  direct: () => unknown;
}

function checksFor(card: Cell[][], feed: number[]): Check[] {
  const c = inline(card), p = card as any, [b, x] = feed;
  return [
    { formula: `=MIXGAP.TPHASES(${b}, ${x}, ${T}, ${c})`, direct: () => t.tPhases(b as any, x as any, T, p) },
    { formula: `=MIXGAP.TSPLIT(${b}, ${x}, ${T}, ${c})`, direct: () => t.tSplit(b as any, x as any, T, p) },
    { formula: `=MIXGAP.TSPLIT({${1 - b - x},${b},${x}},, ${T}, ${c})`, direct: () => t.tSplit([[1 - b - x, b, x]] as any, null as any, T, p) },
    { formula: `=MIXGAP.TDIST("C", ${b}, ${x}, ${T}, ${c})`, direct: () => t.tDist('C', b as any, x as any, T, p) },
    { formula: `=MIXGAP.TSELECT("C", "A", {${b};${x}},, ${T}, ${c})`, direct: () => t.tSelect('C', 'A', [[b], [x]] as any, null as any, T, p) },
    { formula: `=MIXGAP.TACTIVITY("B", ${b}, ${x}, ${T}, ${c})`, direct: () => t.tActivity('B', b as any, x as any, T, p) },
    { formula: `=MIXGAP.TCHEMPOT("A", ${b}, ${x}, ${T}, ${c})`, direct: () => t.tChemPot('A', b as any, x as any, T, p) },
    { formula: `=MIXGAP.TGMIX(${b}, ${x}, ${T}, ${c})`, direct: () => t.tGMix(b as any, x as any, T, p) },
    { formula: `=MIXGAP.TPLAIT(${T}, ${c})`, direct: () => t.tPlait(T, p) },
    { formula: `=MIXGAP.CHECKCARD(${c})`, direct: () => bin.checkCard(p) },
    { formula: `=MIXGAP.TPHASES(0.9, 0.3, ${T}, ${c})`, direct: () => t.tPhases(0.9 as any, 0.3 as any, T, p) },
  ];
}
const SYMMETRIC: Cell[][] = [['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 12000], ['BC.L0', 12000]];
const ALL = [
  ...CARDS.flatMap(({ card, feed }) => checksFor(card, feed)),
  { formula: `=MIXGAP.TTRIANGLE(${T}, ${inline(SYMMETRIC)})`, direct: () => t.tTriangle(T, SYMMETRIC as any) },
];

describe('the embedded engine and mixgap eval --json give what the cell functions give', () => {
  let engine: HyperFormula;
  beforeAll(async () => {
    engine = buildMixgapEngine(await generatedMetadata());
  });

  it('through the engine', () => {
    const want = ALL.map((c) => shown(c.direct));
    const got = evaluateFormulas(engine, ALL.map((c) => c.formula));
    ALL.forEach((c, i) => expectSame(got[i], want[i], c.formula));
  });

  it('through mixgap eval --json (after npm run build)', () => {
    const bin = path.join(root, 'bin', 'mixgap.js');
    expect(existsSync(path.join(root, 'dist', 'node', 'cli.js')), 'run `npm run build`').toBe(true);
    const p = spawnSync(process.execPath, [bin, 'eval', '--json', ...ALL.map((c) => c.formula)], { encoding: 'utf8', cwd: root });
    expect(p.status, p.stderr).toBe(0);
    const got = JSON.parse(p.stdout) as FormulaResult[];
    expect(got).toHaveLength(ALL.length);
    ALL.forEach((c, i) => expectSame(got[i], shown(c.direct), c.formula));
  });
});
