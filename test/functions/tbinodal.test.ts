/**
 * TBINODAL through the cell layer and the embedded engine: its edge row is the gap GAPLOW and
 * GAPHIGH give for the pair's binary card, its rows have equal chemical potentials (TCHEMPOT of
 * both ends), its plait row is TPLAIT's point, #N/A between branches, the spill rule and bad
 * inputs. The numbers themselves are checked against the spec in
 * test/core/ternary/binodalCurve.test.ts. Scenarios and numbers are invented.
 */
import { describe, expect, it } from 'vitest';
import { R } from '../../src/core/constants';
import { CellFailure } from '../../src/functions/errors';
import * as bin from '../../src/functions/functions';
import { spillShape } from '../../src/functions/shapes';
import * as t from '../../src/functions/ternary';
import { evaluateFormulas } from '../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import { failure } from './support/failure';
import { generatedMetadata, inlineArray as inline } from './support/evaluate';

type Cell = string | number;

// water (A) / an invented solvent (B) / an invented solute (C): a gap on the A–B edge only
const RK: Cell[][] = [
  ['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 2000], ['BC.L0', -1000],
  ['name A', 'water'], ['name B', 'solvent'], ['name C', 'solute'],
];
// three equally immiscible liquids: three branches
const SYMMETRIC: Cell[][] = [['model', 'rk'], ['AB.L0', 12000], ['AC.L0', 12000], ['BC.L0', 12000]];
const T = 300;

const table = (card: Cell[][], rows: number) => t.tBinodal(T, card as any, rows) as unknown[][];

describe('TBINODAL', () => {
  it('rows x 6; the first row is the A–B gap of GAPLOW and GAPHIGH with the pair\'s binary card', () => {
    const rows = table(RK, 25);
    expect(rows).toHaveLength(25);
    for (const r of rows) expect(r).toHaveLength(6);
    const edge = [['model', 'rk'], ['L0', 12000]];
    const low = bin.gapLow(T, edge as any), high = bin.gapHigh(T, edge as any);
    const [xA1, xB1, xC1, xA2, xB2, xC2] = rows[0] as number[];
    expect(xC1).toBe(0);
    expect(xC2).toBe(0);
    // both solve the binary equilibrium to ~1e-12 in log-ratio
    expect(Math.abs(xB1 - low) / low).toBeLessThan(1e-9);
    expect(Math.abs(xB2 - high) / high).toBeLessThan(1e-9);
    expect(Math.abs(xA1 + xB1 - 1)).toBeLessThan(1e-15);
    expect(Math.abs(xA2 + xB2 - 1)).toBeLessThan(1e-15);
  });

  it('every inner row: TCHEMPOT of each component equal at both ends; the last row is TPLAIT\'s point', () => {
    const rows = table(RK, 15) as number[][];
    for (const r of rows.slice(1, -1)) {
      for (const c of ['A', 'B', 'C']) {
        const m1 = t.tChemPot(c, r[1] as any, r[2] as any, T, RK as any), m2 = t.tChemPot(c, r[4] as any, r[5] as any, T, RK as any);
        // the tie-line solve stops at 1e-11 RT
        expect(Math.abs(m1 - m2)).toBeLessThan(1e-9 * R * T);
      }
    }
    const [[pA, pB, pC]] = t.tPlait(T, RK as any) as number[][];
    const last = rows[rows.length - 1];
    // both are Newton on the critical conditions from nearby starts, stopping at ~1e-10
    for (const [k, v] of [[0, pA], [1, pB], [2, pC], [3, pA], [4, pB], [5, pC]] as const) expect(Math.abs(last[k] - v)).toBeLessThan(1e-8);
  });

  it('three branches: #N/A rows between them', () => {
    const rows = table(SYMMETRIC, 20);
    const na = rows.map((r) => r.every((c) => c instanceof CellFailure && c.code === '#N/A'));
    // 20 rows: two separators, 18 rows shared equally by three equal branches
    expect(na).toEqual(rows.map((_, i) => i === 6 || i === 13));
  });

  it('bad inputs: too few rows, a fraction of a row, a card without a gap on any edge', () => {
    expect(failure(() => table(SYMMETRIC, 5)).code).toBe('#NUM!');
    expect(failure(() => table(SYMMETRIC, 5)).message).toContain('at least 8 rows');
    expect(failure(() => table(RK, 2)).code).toBe('#NUM!');
    expect(failure(() => table(RK, 12.5)).code).toBe('#NUM!');
    const miscible = [['model', 'rk'], ['AB.L0', 2000], ['AC.L0', 2000], ['BC.L0', 2000]];
    expect(failure(() => table(miscible, 10)).code).toBe('#N/A');
  });

  it('its spill size comes from the 3rd argument written in the formula', () => {
    expect(spillShape('TBINODAL', [T, undefined, 40])).toEqual({ rows: 40, cols: 6 });
    expect(spillShape('TBINODAL', [T, undefined, undefined])).toHaveProperty('error');
    expect(spillShape('TBINODAL', [T, undefined, 1])).toHaveProperty('error');
  });

  it('through the embedded engine: the same table, #N/A rows as errors', async () => {
    const engine = buildMixgapEngine(await generatedMetadata());
    try {
      const [got, sym] = evaluateFormulas(engine, [`=MIXGAP.TBINODAL(${T}, ${inline(RK)}, 12)`, `=MIXGAP.TBINODAL(${T}, ${inline(SYMMETRIC)}, 20)`]) as unknown[][][];
      const want = table(RK, 12) as number[][];
      expect(got).toHaveLength(12);
      // the same computation: equal to the last bits
      got.forEach((r, i) => r.forEach((v, k) => expect(Math.abs((v as number) - want[i][k])).toBeLessThanOrEqual(1e-15)));
      expect(JSON.stringify(sym[6])).toContain('#N/A');
    } finally {
      engine.destroy();
    }
  });
});
