/**
 * The small pieces of the workbook runner: formula text as files store it (addresses and shared
 * formulas are in a1.test.ts). The runner as a whole is tested in calc.test.ts and calc-package.test.ts.
 */
import { describe, expect, test } from 'vitest';
import { engineFormula } from '../../src/hosts/workbook';

describe('engineFormula', () => {
  test('adds the leading "=" the file leaves out', () => {
    expect(engineFormula('SUM(A1:B2)')).toBe('=SUM(A1:B2)');
  });

  test('drops the prefixes files put before newer and add-in functions', () => {
    expect(engineFormula('_xlfn.SEQUENCE(3)+_xlws.SORT(A1:A3)')).toBe('=SEQUENCE(3)+SORT(A1:A3)');
    expect(engineFormula('_xldudf_MIXGAP_GAPLOW(A2, Card!$A$1:$B$5)')).toBe('=MIXGAP.GAPLOW(A2, Card!$A$1:$B$5)');
    expect(engineFormula('[2]!_xldudf_mixgap.TCRIT(B1:C4)*2')).toBe('=MIXGAP.TCRIT(B1:C4)*2');
  });

  test('writes capital exponents as the engine reads them, outside quotes only', () => {
    // Files store numbers as spreadsheet programs print them (1E+21, 2.E-3: ECMA-376 Part 1 (2016)
    // §18.17.2 formula grammar, from memory); the engine's parser reads only a small e.
    expect(engineFormula('A1*1E+21+2.E-3')).toBe('=A1*1e+21+2.e-3');
    expect(engineFormula('LEN("1E5")+1E5')).toBe('=LEN("1E5")+1e5');
    expect(engineFormula('E5+1')).toBe('=E5+1');
  });

  test('leaves the rest alone, text in quotes included', () => {
    expect(engineFormula('MIXGAP.PHASEFRAC(0.2, 600, Card!A1:B5, "high")')).toBe('=MIXGAP.PHASEFRAC(0.2, 600, Card!A1:B5, "high")');
  });
});
