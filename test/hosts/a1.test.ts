/**
 * A1 addresses, ranges and shared formulas moved to another cell (src/hosts/a1.ts). The column
 * letters follow the spreadsheet convention (A..Z, AA..ZZ, AAA..XFD: ECMA-376 Part 1 (2016),
 * §18.18.62 ST_Ref; section number from memory).
 */
import { describe, expect, test } from 'vitest';
import { a1, a1Range, columnName, parseA1, parseRange, quoteSheet, slideFormula } from '../../src/hosts/a1';

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
    expect(a1Range(1, 0, 8, 4)).toBe('A2:E9');
    expect(a1Range(3, 3, 3, 3)).toBe('D4');
    expect(parseRange('B8:A1')).toEqual({ top: 0, left: 0, bottom: 7, right: 1 });
    expect(parseRange('D4')).toEqual({ top: 3, left: 3, bottom: 3, right: 3 });
  });

  test('sheet names are quoted when a formula needs it', () => {
    expect(quoteSheet('Card')).toBe('Card');
    expect(quoteSheet('Calc Sheet')).toBe("'Calc Sheet'");
    expect(quoteSheet("Bob's")).toBe("'Bob''s'");
  });
});

describe('slideFormula (a shared formula moved to another cell of its block)', () => {
  // ECMA-376 Part 1 (2016) §18.3.1.40, f (Formula), shared formulas: relative references move with
  // the cell, $-fixed parts stay (section number from memory).
  test('relative parts move, fixed parts stay', () => {
    expect(slideFormula('A1*2+$B$1+B$2+$C3', 2, 1)).toBe('B3*2+$B$1+C$2+$C5');
    expect(slideFormula("SUM(Inputs!A1:B2)+'Calc Sheet'!C1", 1, 0)).toBe("SUM(Inputs!A2:B3)+'Calc Sheet'!C2");
    expect(slideFormula('SUM(A:A)+SUM(1:2)', 1, 1)).toBe('SUM(B:B)+SUM(2:3)');
  });

  test('text, functions and names that look like addresses are left alone', () => {
    expect(slideFormula('"A1"&A1&LOG10(A2)&\'B1 x\'!A1', 1, 1)).toBe('"A1"&B2&LOG10(B3)&\'B1 x\'!B2');
    expect(slideFormula('MIXGAP.GAPLOW(A1,Card)+RATE2024+Sheet1!A1+1E5', 1, 0)).toBe('MIXGAP.GAPLOW(A2,Card)+RATE2024+Sheet1!A2+1E5');
  });

  test('a reference moved off the sheet becomes #REF!', () => {
    expect(slideFormula('A1+B2', -1, 0)).toBe('#REF!+B1');
  });
});
