/**
 * The embedded engine's wiring, tried on stand-in functions (fixtures/sample-functions.ts) whose
 * metadata comes from the same generator the build uses. What the real functions compute is tested
 * in test/functions; here only what the engine does with arguments, results and failures.
 */
import path from 'path';
import { beforeAll, describe, expect, test } from 'vitest';
import { generateCustomFunctionsMetadata } from 'custom-functions-metadata';
import { DetailedCellError, ErrorType, HyperFormula } from 'hyperformula';
import { buildEngine } from '../../src/hosts/engine';
import type { CustomFunctionsMetadata } from '../../src/hosts/engine';
import { evaluateFormulas } from '../../src/hosts/evaluate';
import * as sample from './fixtures/sample-functions';
import { sampleSpillShape } from './fixtures/sample-shapes';

const fixture = path.join(__dirname, 'fixtures', 'sample-functions.ts');
let engine: HyperFormula;
let metadata: CustomFunctionsMetadata;

beforeAll(async () => {
  const generated = await generateCustomFunctionsMetadata(fixture, false);
  expect(generated.errors).toEqual([]);
  metadata = JSON.parse(generated.metadataJson);
  engine = buildEngine(metadata, sample, sampleSpillShape);
});

/** Value of one formula in a fresh sheet of the shared engine. */
function evaluate(formula: string) {
  return evaluateFormulas(engine, [formula])[0];
}

/** The raw engine value of a formula, to look at error types. */
function cell(formula: string) {
  const name = engine.addSheet();
  const sheet = engine.getSheetId(name)!;
  engine.setCellContents({ sheet, row: 0, col: 0 }, [[formula]]);
  return engine.getCellValue({ sheet, row: 0, col: 0 });
}

describe('registration', () => {
  test('every stand-in function is callable as MIXGAP.<NAME>, in any case', () => {
    expect(evaluate('=MIXGAP.ECHO(2)')).toBe(2);
    expect(evaluate('=mixgap.echo(3)')).toBe(3);
    for (const f of metadata.functions) {
      expect(engine.getRegisteredFunctionNames(), f.name).toContain(`MIXGAP.${f.name}`);
    }
  });

  test('the ids the generator associates are the export names upper-cased', async () => {
    const { associate } = await generateCustomFunctionsMetadata(fixture, false);
    expect(associate.length).toBe(Object.keys(sample).length);
    for (const a of associate) expect(a.id).toBe(a.functionName.toUpperCase());
  });

  test('TRUE and FALSE can be written without parentheses, as in Excel', () => {
    expect(evaluate('=IF(TRUE, 1, 2)')).toBe(1);
    expect(evaluate('=AND(true, NOT(FALSE))')).toBe(true);
  });

  test('built-in functions are still there', () => {
    expect(evaluate('=SUM(1, 2)')).toBe(3);
    expect(evaluate('=SEQUENCE(3, 2)')).toEqual([[1, 2], [3, 4], [5, 6]]);
  });

  test('a second engine with other implementations does not change the first', () => {
    const other = buildEngine(metadata, { ...sample, echo: (x: number) => -x }, sampleSpillShape);
    expect(evaluateFormulas(other, ['=MIXGAP.ECHO(5)'])[0]).toBe(-5);
    expect(evaluate('=MIXGAP.ECHO(5)')).toBe(5);
    other.destroy();
  });
});

describe('numbers are not rounded', () => {
  // Exact equality on purpose: the engine must hand over the double the function returned.
  test('a small result with many digits comes through bit-exact', () => {
    expect(evaluate('=MIXGAP.TINY(12.3)')).toBe(sample.tiny(12.3));
    expect(evaluate('=MIXGAP.TINY(-7)')).toBe(sample.tiny(-7));
  });

  test('literal arguments with 15-17 significant digits reach the function unchanged', () => {
    expect(evaluate('=MIXGAP.ECHO(0.123456789012345)')).toBe(0.123456789012345);
    expect(evaluate('=MIXGAP.ECHO(4.1e-11)')).toBe(4.1e-11);
    expect(evaluate(`=MIXGAP.ECHO(${String(1 / 3)})`)).toBe(1 / 3);
  });

  test('a value one ulp away from another stays distinct', () => {
    const x = 0.1 + 0.2; // 0.30000000000000004, one ulp above 0.3
    expect(evaluate(`=MIXGAP.ECHO(${x}) - 0.3`)).toBe(x - 0.3);
  });
});

describe('arguments', () => {
  test('text where a number is expected reaches the function as it is (the function says what is wrong)', () => {
    // Mixgap's functions check their number arguments themselves, with a message that names the
    // argument; the engine must not coerce or replace the text first.
    expect(cell('=MIXGAP.ECHO("abc")')).toBe('abc');
    expect(cell('=MIXGAP.ECHO(2.5)')).toBe(2.5);
  });

  test('a matrix parameter takes an inline array, a scalar or a range with empty cells as null', () => {
    expect(evaluate('=MIXGAP.DESCRIBE({18000,0,0;4000,0,0})')).toBe('sum=22000 empty=0 shape=2x3');
    expect(evaluate('=MIXGAP.DESCRIBE(21000)')).toBe('sum=21000 empty=0 shape=1x1');
    const name = engine.addSheet();
    const sheet = engine.getSheetId(name)!;
    engine.setCellContents({ sheet, row: 0, col: 0 }, [[1, null], [2, 3], ['=MIXGAP.DESCRIBE(A1:B2)']]);
    expect(engine.getCellValue({ sheet, row: 2, col: 0 })).toBe('sum=6 empty=1 shape=2x2');
  });

  test('an error inside a matrix argument propagates', () => {
    const v = cell('=MIXGAP.DESCRIBE({1,2;3,1/0})');
    expect((v as DetailedCellError).type).toBe(ErrorType.DIV_BY_ZERO);
  });

  test('an omitted optional argument arrives as undefined, written or left empty', () => {
    expect(evaluate('=MIXGAP.OPTIONAL(1)')).toBe('omitted');
    expect(evaluate('=MIXGAP.OPTIONAL(1,)')).toBe('omitted');
    expect(evaluate('=MIXGAP.OPTIONAL(1, 2.5)')).toBe('given 2.5');
  });

  test('too many arguments give #N/A', () => {
    expect((cell('=MIXGAP.ECHO(1, 2)') as DetailedCellError).type).toBe(ErrorType.NA);
  });

  test('a range passed to a scalar parameter is lifted element by element', () => {
    expect(evaluate('=MIXGAP.ECHO({1,2,3})')).toEqual([[1, 2, 3]]);
  });

  test('literal values are read from the formula text, computed ones are not', () => {
    // The stand-in spillShape for LITERALS reports the literal arguments it was given.
    const seen = (formula: string) => (evaluate(formula) as { message: string }).message;
    expect(seen('=MIXGAP.LITERALS(3, -2.5, "RK", TRUE())')).toBe('literals [3,-2.5,"RK",true]');
    expect(seen('=MIXGAP.LITERALS((4), +1, 50%, FALSE())')).toBe('literals [4,1,0.5,false]');
    expect(seen('=MIXGAP.LITERALS(B5, 1+2, {1,2}, SUM(1))')).toBe('literals [null,null,null,null]');
    expect(seen('=MIXGAP.LITERALS(7)')).toBe('literals [7]');
    expect(seen('=MIXGAP.LITERALS(TRUE, false)')).toBe('literals [true,false]');
  });
});

describe('failures', () => {
  test.each([
    ['#N/A', ErrorType.NA],
    ['#NUM!', ErrorType.NUM],
    ['#VALUE!', ErrorType.VALUE],
  ])('a thrown CellFailure %s becomes that error with its message', (code, type) => {
    const v = cell(`=MIXGAP.FAIL("${code}", "T must be below the critical temperature")`);
    expect(v).toBeInstanceOf(DetailedCellError);
    expect((v as DetailedCellError).type).toBe(type);
    expect((v as DetailedCellError).message).toBe('T must be below the critical temperature');
    expect(evaluate(`=MIXGAP.FAIL("${code}", "why")`)).toEqual({ error: code, message: 'why' });
  });

  test('any other exception becomes #VALUE! "internal error ..." and nothing crashes', () => {
    const v = evaluate('=MIXGAP.CRASH()');
    expect(v).toEqual({ error: '#VALUE!', message: expect.stringMatching(/^internal error in MIXGAP\.CRASH: cannot read/) });
  });

  test('a missing implementation is reported in the cell, not thrown', () => {
    const { echo: _omitted, ...rest } = sample;
    const partial = buildEngine(metadata, rest, sampleSpillShape);
    expect(evaluateFormulas(partial, ['=MIXGAP.ECHO(1)'])[0]).toEqual({ error: '#VALUE!', message: expect.stringContaining('no implementation') });
    partial.destroy();
  });
});

describe('spilled results', () => {
  test('a literal size spills the whole table', () => {
    expect(evaluate('=MIXGAP.TABLE(3, 2)')).toEqual(sample.table(3, 2));
    expect(evaluate('=MIXGAP.TABLE(1, 4)')).toEqual(sample.table(1, 4));
  });

  test('cells of a spilled result keep their own errors and texts', () => {
    expect(evaluate('=MIXGAP.MIXED()')).toEqual([[1, 'two'], [{ error: '#NUM!', message: 'cell (1, 0) has no solution' }, 4]]);
  });

  test('a size from a cell gives #VALUE! with the reason spillShape gives', () => {
    const name = engine.addSheet();
    const sheet = engine.getSheetId(name)!;
    engine.setCellContents({ sheet, row: 0, col: 0 }, [[3, '=MIXGAP.TABLE(A1, 2)']]);
    const v = engine.getCellValue({ sheet, row: 0, col: 1 }) as DetailedCellError;
    expect(v).toBeInstanceOf(DetailedCellError);
    expect(v.type).toBe(ErrorType.VALUE);
    expect(v.message).toBe((sampleSpillShape('TABLE', [undefined, 2]) as { error: string }).error);
  });

  test('a spilled result can be used inside another formula', () => {
    expect(evaluate('=SUM(MIXGAP.TABLE(2, 2))')).toBe(sample.table(2, 2).flat().reduce((a, b) => a + b));
    expect(evaluate('=INDEX(MIXGAP.TABLE(3, 3), 3, 2)')).toBe(sample.table(3, 3)[2][1]);
  });

  test('a result larger than its promised size is an internal error, not a crash', () => {
    // The engine fills the promised range with the error of the formula.
    const error = { error: '#VALUE!', message: expect.stringContaining('returned 3x1 cells but the formula text promised 2x1') };
    expect(evaluate('=MIXGAP.OVERSIZED()')).toEqual([[error], [error]]);
  });
});
