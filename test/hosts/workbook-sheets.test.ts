/**
 * evaluateWorkbook with sheet names the engine orders differently from the workbook: a sheet named
 * "2024" (an integer-like name comes first among a JavaScript object's keys, ECMA-262 §10.1.11.1
 * OrdinaryOwnPropertyKeys; section number from memory) after a sheet "Data", with a name local to
 * it. Expected values are the formulas' arithmetic (common practice, no published source).
 */
import { describe, expect, test } from 'vitest';
import { buildEngine } from '../../src/hosts/engine';
import { evaluateWorkbook, WORKBOOK_ENGINE_CONFIG } from '../../src/hosts/workbook';
import { readPackage } from '../../src/hosts/xlsx-package';
import { dataAnd2024Book } from './support/book';

function book(): Promise<Buffer> {
  return dataAnd2024Book("'2024'!$A$1", '<row r="1"><c r="A1"><v>5</v></c></row><row r="2"><c r="B2"><f>SUM(1,2)</f></c></row>',
    '<row r="1"><c r="A1"><f>Data!A1*2</f></c><c r="B1"><f>A1+1</f></c><c r="C1"><f>k*3</f></c></row>');
}

describe('evaluateWorkbook', () => {
  test('results land in the right sheet, and a sheet-local name is seen from its sheet', async () => {
    const pkg = await readPackage(await book(), 'test.xlsx');
    const { report, edits, engine } = await evaluateWorkbook(pkg, (content) =>
      buildEngine({ functions: [] }, {}, () => ({ rows: 1, cols: 1 }), WORKBOOK_ENGINE_CONFIG, content));
    engine.destroy();
    expect(report.sheets).toEqual(['Data', '2024']);
    expect(report.errors).toEqual([]);
    expect(edits.get('2024')!.get(0)!.get(0)!.value).toEqual({ number: 10 });
    expect(edits.get('2024')!.get(0)!.get(1)!.value).toEqual({ number: 11 });
    expect(edits.get('2024')!.get(0)!.get(2)!.value).toEqual({ number: 30 });
    expect(edits.get('Data')!.get(1)!.get(1)!.value).toEqual({ number: 3 });
  });
});
