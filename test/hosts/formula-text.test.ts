/**
 * Formula texts as people type them. In Excel set to a language whose decimal separator is ","
 * (German, French, ...), arguments are separated by ";" and numbers written 21000,5 (from memory:
 * Microsoft Excel help, "Change the character used to separate thousands or decimals", and the
 * list separator of the regional settings). The engine reads the English syntax only.
 */
import { describe, expect, test } from 'vitest';
import { calledNames, readSemicolons, SEMICOLON_HINT } from '../../src/hosts/formula-text';

describe('readSemicolons', () => {
  test('";" between arguments is read as ","', () => {
    expect(readSemicolons('=SUM(1; 2)')).toEqual({ formula: '=SUM(1, 2)' });
    expect(readSemicolons('=MIXGAP.GAPLOW(800;21000)')).toEqual({ formula: '=MIXGAP.GAPLOW(800,21000)' });
    expect(readSemicolons('=IF(A1>0; SUM(1;2); -1)')).toEqual({ formula: '=IF(A1>0, SUM(1,2), -1)' });
  });

  test('";" inside strings and quoted sheet names is text, and is kept', () => {
    expect(readSemicolons('=CONCATENATE("a;b"; \'x;y\'!A1)')).toEqual({ formula: '=CONCATENATE("a;b", \'x;y\'!A1)' });
    expect(readSemicolons('="say ""a;b"""')).toEqual({ formula: '="say ""a;b"""' });
  });

  test('";" between the rows of an inline array is left alone', () => {
    expect(readSemicolons('={1,2;3,4}')).toEqual({ formula: '={1,2;3,4}' });
    expect(readSemicolons('=SUM({1,2;3,4})')).toEqual({ formula: '=SUM({1,2;3,4})' });
  });

  test('";" between arguments together with "," or an inline array is not guessed at: the hint says what to write', () => {
    // 21000,5 is 21000.5 where ";" separates arguments; in the engine's syntax "," separates them.
    expect(readSemicolons('=MIXGAP.GAPLOW(800; 21000,5)')).toEqual({ formula: '=MIXGAP.GAPLOW(800; 21000,5)', hint: SEMICOLON_HINT });
    expect(readSemicolons('=SUM({1;2}; 3)')).toEqual({ formula: '=SUM({1;2}; 3)', hint: SEMICOLON_HINT });
    expect(SEMICOLON_HINT).toContain('","');
  });

  test('formulas without ";" between arguments are unchanged', () => {
    for (const f of ['=1', '=SUM(1, 2)', '="a;b"', '=A1;B1']) expect(readSemicolons(f)).toEqual({ formula: f });
  });
});

describe('calledNames', () => {
  test('the names before "(" outside quotes, upper case, once each', () => {
    expect(calledNames('=gaplow(800, 21000) + MIXGAP.TCRIT(21000) + GAPLOW(1, 2)')).toEqual(['GAPLOW', 'MIXGAP.TCRIT']);
    expect(calledNames('="GAPLOW(1)" & \'TCRIT(\'!A1')).toEqual([]);
    expect(calledNames('=(1+2)*A1')).toEqual([]);
  });
});
