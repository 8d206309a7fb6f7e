/**
 * TSTAGETABLE (src/functions/extraction.ts): the stages of a counter-current cascade, one row per
 * stage. Its rows are the core's stages (src/core/ternary/extraction.ts), its last streams are
 * TCASCADE's, each row's raffinate and extract lie on one tie-line (equal chemical potentials by
 * TCHEMPOT), each stage balances, the engine spills N x 8 with N from the formula text, and bad
 * inputs say what is wrong. Invented system: water (A) / an invented solvent (B) / an invented
 * solute (C), as in test/functions/extraction.test.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { cascade } from '../../src/core/ternary/extraction';
import * as x from '../../src/functions/extraction';
import * as t from '../../src/functions/ternary';
import { readTernaryCard } from '../../src/functions/ternaryCard';
import { evaluateFormulas } from '../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import { failure } from './support/failure';
import { generatedMetadata, inlineArray as inline } from './support/evaluate';

type Cell = string | number;
const RK: Cell[][] = [
  ['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 2000], ['BC.L0', -1000],
  ['name A', 'water'], ['name B', 'solvent'], ['name C', 'solute'],
];
const T = 300;
const RT = 8.314462618 * T;
const feed = [[0.9, 0, 0.1]], solvent = [[0, 1, 0]];
const a = (v: unknown) => v as any;

describe('TSTAGETABLE in the cell layer', () => {
  for (const N of [1, 3, 5]) {
    const rows = x.tStageTable(a(feed), a(solvent), a([[100, 40]]), N, 'solute', T, a(RK)) as number[][];

    it(`N = ${N}: one row per stage, the core's stages (same code, same doubles)`, () => {
      const core = cascade(readTernaryCard(RK).model, T, { amount: 100, x: { xA: 0.9, xB: 0, xC: 0.1 } }, { amount: 40, x: { xA: 0, xB: 1, xC: 0 } }, N, 2);
      expect(rows).toHaveLength(N);
      rows.forEach((row, k) => {
        const { raffinate: R, extract: E } = core.stages[k];
        expect(row).toEqual([R.x.xA, R.x.xB, R.x.xC, R.amount, E.x.xA, E.x.xB, E.x.xC, E.amount]);
      });
    });

    it(`N = ${N}: the raffinate of stage N and the extract of stage 1 are TCASCADE's`, () => {
      const final = x.tCascade(a(feed), a(solvent), a([[100, 40]]), N, 'solute', T, a(RK));
      expect(rows[N - 1].slice(0, 4)).toEqual(final[0].slice(0, 4));
      expect(rows[0].slice(4, 8)).toEqual(final[1].slice(0, 4));
    });

    it(`N = ${N}: each stage's raffinate and extract lie on one tie-line (equal TCHEMPOT of A, B, C)`, () => {
      for (const [k, row] of rows.entries()) {
        for (const c of ['A', 'B', 'C']) {
          const muR = t.tChemPot(c, a(row[1]), a(row[2]), T, a(RK)), muE = t.tChemPot(c, a(row[5]), a(row[6]), T, a(RK));
          // phase equilibrium: equal chemical potential of each component in both phases
          // (Prigogine & Defay, Chemical Thermodynamics, 1954, ch. 15); 1e-9 RT as the core's split tests allow
          expect(Math.abs(muR - muE), `stage ${k + 1}, mu_${c}`).toBeLessThan(1e-9 * (RT + Math.abs(muR)));
        }
        // two distinct phases, not one point twice
        expect(Math.abs(row[2] - row[6]), `stage ${k + 1}`).toBeGreaterThan(0.01);
      }
    });

    it(`N = ${N}: every stage balances: R_(k-1) + E_(k+1) = R_k + E_k per component, R_0 = feed, E_(N+1) = solvent`, () => {
      // conservation of mass around each stage (common practice, no published source); 1e-12 of
      // the inflow is what the cascade promises (README, "Extraction cascades")
      const flows = (row: number[], at: number) => [0, 1, 2].map((c) => row[at + 3] * row[at + c]);
      const F = [90, 0, 10], S = [0, 40, 0], inflow = [90, 40, 10];
      for (let k = 0; k < N; k++) {
        const rIn = k === 0 ? F : flows(rows[k - 1], 0), eIn = k === N - 1 ? S : flows(rows[k + 1], 4);
        const rOut = flows(rows[k], 0), eOut = flows(rows[k], 4);
        for (let c = 0; c < 3; c++) {
          expect(Math.abs(rIn[c] + eIn[c] - rOut[c] - eOut[c]), `stage ${k + 1}, component ${'ABC'[c]}`).toBeLessThan(1e-12 * inflow[c]);
        }
      }
    });
  }

  it('more stages carry less solute out in the last raffinate (the stage 2 raffinate is leaner than stage 1\'s)', () => {
    const rows = x.tStageTable(a(feed), a(solvent), 0.4 as any, 4, 'C', T, a(RK)) as number[][];
    // a counter-current cascade strips the raffinate stage by stage (common practice, no published source)
    for (let k = 1; k < 4; k++) expect(rows[k][2]).toBeLessThan(rows[k - 1][2]);
  });

  it('says what is wrong', () => {
    const cases: Array<[string, () => unknown, string, RegExp]> = [
      ['no stages', () => x.tStageTable(a(feed), a(solvent), 0.4 as any, 0, 'C', T, a(RK)), '#NUM!', /N = 0: give a whole number of stages from 1 to 100/],
      ['a fractional stage count', () => x.tStageTable(a(feed), a(solvent), 0.4 as any, 2.5, 'C', T, a(RK)), '#NUM!', /whole number of stages/],
      ['101 stages', () => x.tStageTable(a(feed), a(solvent), 0.4 as any, 101, 'C', T, a(RK)), '#NUM!', /from 1 to 100/],
      ['unknown component', () => x.tStageTable(a(feed), a(solvent), 0.4 as any, 2, 'ethanol', T, a(RK)), '#VALUE!', /not a component of this card/],
      ['a feed in one cell', () => x.tStageTable(0.9 as any, a(solvent), 0.4 as any, 2, 'C', T, a(RK)), '#VALUE!', /range of two cells/],
      ['three amounts', () => x.tStageTable(a(feed), a(solvent), a([[1, 2, 3]]), 2, 'C', T, a(RK)), '#VALUE!', /give one \(the solvent-to-feed ratio\) or two/],
      ['no solute in the feed', () => x.tStageTable(a([[0, 0.9, 0.1]]), a(solvent), 0.4 as any, 2, 'A', T, a(RK)), '#NUM!', /holds no A/],
      ['a feed outside the triangle', () => x.tStageTable(a([[0.9, 0.2, -0.1]]), a(solvent), 0.4 as any, 2, 'C', T, a(RK)), '#NUM!', /outside the composition triangle/],
    ];
    for (const [what, call, code, message] of cases) {
      const e = failure(call);
      expect(e.code, what).toBe(code);
      expect(e.message, what).toMatch(message);
    }
  });
});

describe('TSTAGETABLE through the embedded engine', () => {
  let engine: HyperFormula;
  beforeAll(async () => {
    engine = buildMixgapEngine(await generatedMetadata());
  });

  it('spills N x 8, as the direct call gives', () => {
    const got = evaluateFormulas(engine, [`=MIXGAP.TSTAGETABLE({0.9,0,0.1}, {0,1,0}, 0.4, 4, "solute", ${T}, ${inline(RK)})`]);
    expect(got[0]).toEqual(x.tStageTable(a(feed), a(solvent), 0.4 as any, 4, 'solute', T, a(RK)));
    expect((got[0] as unknown[][]).map((r) => r.length)).toEqual([8, 8, 8, 8]);
  });

  it('a stage count from a cell cannot size the spill: the error says to write it as a number', () => {
    const sheet = engine.getSheetId(engine.addSheet())!;
    engine.setCellContents({ sheet, row: 0, col: 0 }, [[3, `=MIXGAP.TSTAGETABLE({0.9,0,0.1}, {0,1,0}, 0.4, A1, "solute", ${T}, ${inline(RK)})`]]);
    const v = engine.getCellValue({ sheet, row: 0, col: 1 }) as { type?: string; message?: string };
    expect(v.type).toBe('VALUE');
    expect(v.message).toMatch(/TSTAGETABLE: write the number of stages \(4th argument\) as a number in the formula/);
  });
});
