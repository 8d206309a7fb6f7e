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

  test('leaves the rest alone, text in quotes included', () => {
    expect(engineFormula('MIXGAP.PHASEFRAC(0.2, 600, Card!A1:B5, "high")')).toBe('=MIXGAP.PHASEFRAC(0.2, 600, Card!A1:B5, "high")');
  });
});
