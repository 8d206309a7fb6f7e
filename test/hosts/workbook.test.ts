/**
 * The small pieces of the workbook runner: formula text as files store it, addresses and ranges.
 * The runner as a whole is tested in calc.test.ts.
 */
import { describe, expect, test } from 'vitest';
import { a1, columnName, engineFormula, parseA1, parseRange, quoteSheet } from '../../src/hosts/workbook';

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

describe('addresses', () => {
  test('column letters both ways, at the one- to three-letter boundaries', () => {
    for (const [col, name] of [[0, 'A'], [25, 'Z'], [26, 'AA'], [701, 'ZZ'], [702, 'AAA'], [16383, 'XFD']] as const) {
      expect(columnName(col)).toBe(name);
      expect(parseA1(`${name}7`)).toEqual({ row: 6, col });
    }
    expect(a1(0, 27)).toBe('AB1');
    expect(parseA1('$C$12')).toEqual({ row: 11, col: 2 });
    expect(() => parseA1('12C')).toThrow(/not a cell address/);
  });

  test('ranges in either order, and single cells', () => {
    expect(parseRange('B8:A1')).toEqual({ top: 0, left: 0, bottom: 7, right: 1 });
    expect(parseRange('D4')).toEqual({ top: 3, left: 3, bottom: 3, right: 3 });
  });

  test('sheet names are quoted when a formula needs it', () => {
    expect(quoteSheet('Card')).toBe('Card');
    expect(quoteSheet('Calc Sheet')).toBe("'Calc Sheet'");
    expect(quoteSheet("Bob's")).toBe("'Bob''s'");
  });
});
