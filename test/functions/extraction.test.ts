/**
 * Extraction cascades in cells (src/functions/extraction.ts): TCASCADE, TRECOVERY and TSTAGES
 * directly and through the embedded engine, one stage against TSPLIT of the mixed feed, the
 * amounts as a ratio or as two amounts, bad inputs, and cross-current stages built from chained
 * TSPLIT cells in an engine sheet against the core's cross-current cascade. The numbers
 * themselves (balances, Kremser) are checked in test/core/ternary/extraction.test.ts. Invented
 * system: water (A) / an invented solvent (B) / an invented solute (C).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { crossCurrent } from '../../src/core/ternary/extraction';
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
const feed = [[0.9, 0, 0.1]], solvent = [[0, 1, 0]];
const a = (v: unknown) => v as any;

describe('TCASCADE, TRECOVERY, TSTAGES in the cell layer', () => {
  it('one stage is TSPLIT of the mixed feed: the same phases, amounts M times the fractions', () => {
    const F = 100, S = 40, M = F + S;
    const rows = x.tCascade(a(feed), a(solvent), a([[F, S]]), 1, 'solute', T, a(RK));
    const f = F / M, s = S / M;
    // the mixture as the core mixes it: z = f z_F + s z_S, fraction by fraction
    const z = [f * 0.9 + s * 0, f * 0 + s * 1, f * 0.1 + s * 0];
    const split = t.tSplit(a(z[1]), a(z[2]), T, a(RK));
    const raff = split[0][1] < split[1][1] ? 0 : 1; // the raffinate is poorer in the solvent B
    // the same split of the same feed: equal bits
    expect(rows[0].slice(0, 3)).toEqual(split[raff].slice(0, 3));
    expect(rows[1].slice(0, 3)).toEqual(split[1 - raff].slice(0, 3));
    expect(rows[0][3]).toBe(M * split[raff][3]);
    expect(rows[1][3]).toBe(M * split[1 - raff][3]);
  });

  it('the shares of the solute in raffinate and extract add to 1; TRECOVERY is the extract\'s', () => {
    for (const N of [1, 3, 6]) {
      const rows = x.tCascade(a(feed), a(solvent), 0.4 as any, N, 'C', T, a(RK));
      // the cascade's balance, 1e-12 of the inflow (test/core/ternary/extraction.test.ts)
      expect(Math.abs(rows[0][4] + rows[1][4] - 1)).toBeLessThan(1e-12);
      expect(x.tRecovery(a(feed), a(solvent), 0.4 as any, N, 'solute', T, a(RK))).toBe(rows[1][4]);
    }
  });

  it('a ratio is per mole of feed: the same compositions as the amounts 100 and 40, amounts / 100', () => {
    const byRatio = x.tCascade(a(feed), a(solvent), 0.4 as any, 4, 'C', T, a(RK));
    const byAmounts = x.tCascade(a(feed), a(solvent), a([[100], [40]]), 4, 'C', T, a(RK));
    for (let r = 0; r < 2; r++) {
      for (let c = 0; c < 5; c++) {
        const scale = c === 3 ? 100 : 1;
        // the same cascade in other units: Newton's stopping point, 1e-12 of the inflow
        expect(Math.abs(byAmounts[r][c] / scale - byRatio[r][c]), `[${r}][${c}]`).toBeLessThan(1e-11 * Math.max(1, Math.abs(byRatio[r][c])));
      }
    }
  });

  it('TSTAGES: a whole count\'s recovery gives that count; a target between counts lies between them', () => {
    const r3 = x.tRecovery(a(feed), a(solvent), 0.4 as any, 3, 'C', T, a(RK));
    expect(x.tStages(r3, a(feed), a(solvent), 0.4 as any, 'C', T, a(RK))).toBe(3);
    const r4 = x.tRecovery(a(feed), a(solvent), 0.4 as any, 4, 'C', T, a(RK));
    const n = x.tStages((r3 + r4) / 2, a(feed), a(solvent), 0.4 as any, 'C', T, a(RK));
    expect(n).toBeGreaterThan(3);
    expect(n).toBeLessThan(4);
  });

  it('says what is wrong', () => {
    const rows: Array<[string, () => unknown, string, RegExp]> = [
      ['feed outside the triangle', () => x.tCascade(a([[0.9, 0.2, -0.1]]), a(solvent), 0.4 as any, 2, 'C', T, a(RK)), '#NUM!', /outside the composition triangle/],
      ['feed fractions not summing to 1', () => x.tCascade(a([[0.9, 0.2, 0.1]]), a(solvent), 0.4 as any, 2, 'C', T, a(RK)), '#NUM!', /sum to 1.2/],
      ['unknown component', () => x.tCascade(a(feed), a(solvent), 0.4 as any, 2, 'ethanol', T, a(RK)), '#VALUE!', /not a component of this card/],
      ['a feed in one cell', () => x.tCascade(0.9 as any, a(solvent), 0.4 as any, 2, 'C', T, a(RK)), '#VALUE!', /range of two cells/],
      ['three amounts', () => x.tCascade(a(feed), a(solvent), a([[1, 2, 3]]), 2, 'C', T, a(RK)), '#VALUE!', /give one \(the solvent-to-feed ratio\) or two/],
      ['a negative ratio', () => x.tRecovery(a(feed), a(solvent), -1 as any, 2, 'C', T, a(RK)), '#NUM!', /positive/],
      ['a fractional stage count', () => x.tRecovery(a(feed), a(solvent), 0.4 as any, 2.5, 'C', T, a(RK)), '#NUM!', /whole number of stages/],
      ['no solute in the feed', () => x.tRecovery(a([[0, 0.9, 0.1]]), a(solvent), 0.4 as any, 2, 'A', T, a(RK)), '#NUM!', /holds no A/],
      ['a target of 1', () => x.tStages(1, a(feed), a(solvent), 0.4 as any, 'C', T, a(RK)), '#NUM!', /strictly between 0 and 1/],
      ['a target out of reach', () => x.tStages(0.999999, a(feed), a(solvent), 0.4 as any, 'C', T, a(RK), 3), '#N/A', /cannot reach a recovery of 0.999999 with up to 3 stages: it reaches 0\.\d+/],
    ];
    for (const [what, call, code, message] of rows) {
      const e = failure(call);
      expect(e.code, what).toBe(code);
      expect(e.message, what).toMatch(message);
    }
  });
});

describe('through the embedded engine', () => {
  let engine: HyperFormula;
  beforeAll(async () => {
    engine = buildMixgapEngine(await generatedMetadata());
  });

  it('TCASCADE spills 2 x 5 and TSTAGES is one cell, as the direct calls give; a target out of reach is #N/A', () => {
    const card = inline(RK);
    const got = evaluateFormulas(engine, [
      `=MIXGAP.TCASCADE({0.9,0,0.1}, {0,1,0}, 0.4, 3, "solute", ${T}, ${card})`,
      `=MIXGAP.TSTAGES(0.9, {0.9,0,0.1}, {0,1,0}, 0.4, "solute", ${T}, ${card})`,
      `=MIXGAP.TSTAGES(0.999999, {0.9,0,0.1}, {0,1,0}, 0.4, "solute", ${T}, ${card}, 3)`,
    ]);
    expect(got[0]).toEqual(x.tCascade(a(feed), a(solvent), 0.4 as any, 3, 'solute', T, a(RK)));
    expect(got[1]).toBe(x.tStages(0.9, a(feed), a(solvent), 0.4 as any, 'solute', T, a(RK)));
    expect((got[2] as { error: string }).error).toBe('#N/A');
  });

  it('three cross-current stages as chained TSPLIT cells equal the core cross-current cascade', () => {
    // Per stage, four rows: [raffinate in: amount, x_A, x_B, x_C | solvent amount | M | z_B | z_C],
    // then TSPLIT of the mixture spilled below; the next stage's raffinate is the phase poorer in
    // the solvent B, its amount M times its fraction. The card sits in K1:L7.
    const sheet = engine.getSheetId(engine.addSheet())!;
    engine.setCellContents({ sheet, row: 0, col: 10 }, RK);
    const cardRange = '$K$1:$L$7';
    const content: Cell[][] = [];
    for (let k = 0; k < 3; k++) {
      const r = 4 * k + 1; // 1-based row of the stage's first line
      const inRow = k === 0 ? [100, 0.9, 0, 0.1] : [
        `=F${r - 4}*IF(B${r - 3}<B${r - 2},D${r - 3},D${r - 2})`,
        `=IF(B${r - 3}<B${r - 2},A${r - 3},A${r - 2})`,
        `=IF(B${r - 3}<B${r - 2},B${r - 3},B${r - 2})`,
        `=IF(B${r - 3}<B${r - 2},C${r - 3},C${r - 2})`,
      ];
      content.push([...inRow, 40, `=A${r}+E${r}`, `=(A${r}*C${r}+E${r})/F${r}`, `=A${r}*D${r}/F${r}`]);
      content.push([`=MIXGAP.TSPLIT(G${r}, H${r}, ${T}, ${cardRange})`], [], []);
    }
    engine.setCellContents({ sheet, row: 0, col: 0 }, content);
    const v = (row: number, col: number) => engine.getCellValue({ sheet, row, col }) as number;
    const core = crossCurrent(readTernaryCard(RK).model, T, { amount: 100, x: { xA: 0.9, xB: 0, xC: 0.1 } }, { xA: 0, xB: 1, xC: 0 }, [40, 40, 40]);
    for (let k = 0; k < 3; k++) {
      const r0 = 4 * k + 1, p = v(r0, 1) < v(r0 + 1, 1) ? r0 : r0 + 1; // 0-based rows of the spilled phases
      const M = v(4 * k, 5);
      // the sheet mixes as a user writes it ((A x_B + S) / M), the core as f x + s x: the same
      // mixture to rounding, so the same tie-line to Newton's last bits, 1e-12
      expect(Math.abs(M * v(p, 3) - core[k].raffinate.amount)).toBeLessThan(1e-12 * core[k].mixture.amount);
      for (const [c, key] of [[0, 'xA'], [1, 'xB'], [2, 'xC']] as const) {
        expect(Math.abs(v(p, c) - core[k].raffinate.x[key]), `stage ${k + 1}, ${key}`).toBeLessThan(1e-12);
      }
    }
  });
});
