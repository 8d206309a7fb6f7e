/**
 * Shared formulas (a filled range stored once, ECMA-376 Part 1 (2016) §18.3.1.40, `f` with t="shared";
 * section number from memory) are read once per block by the engine (src/hosts/engine-formula-groups.ts).
 * Every cell must still show what its own formula gives: blocks moved down and right from their
 * first cell, a block whose formula holds a range (read cell by cell), a cell where moving makes a
 * reference #REF! (past the last column), an `si` used again for a second block, a sheet-local name,
 * a reference to another sheet, and a sheet the engine numbers before the workbook's first ("2024").
 * Expected values are the formulas' arithmetic (common practice, no published source).
 */
import { DetailedCellError } from 'hyperformula';
import type { SimpleCellAddress } from 'hyperformula';
import { describe, expect, test } from 'vitest';
import { buildEngine } from '../../src/hosts/engine';
import type { EngineContent } from '../../src/hosts/engine';
import { parseA1 } from '../../src/hosts/a1';
import { evaluateWorkbook, WORKBOOK_ENGINE_CONFIG } from '../../src/hosts/workbook';
import { readPackage } from '../../src/hosts/xlsx-package';
import { dataAnd2024Book } from './support/book';

const cell = (ref: string, inner: string) => `<c r="${ref}">${inner}</c>`;
const shared = (si: number, text = '', ref?: string) => (text ? `<f t="shared"${ref ? ` ref="${ref}"` : ''} si="${si}">${text}</f>` : `<f t="shared" si="${si}"/>`);

function book(): Promise<Buffer> {
  // Data: A1 = 1000, and B1:B3 = $A$1 + ROW() moved down (B1 first).
  const data = `<row r="1">${cell('A1', '<v>1000</v>')}${cell('B1', shared(0, '$A$1+ROW()', 'B1:B3'))}</row>`
    + `<row r="2">${cell('B2', shared(0))}</row><row r="3">${cell('B3', shared(0))}</row>`;
  // 2024: A1:A6 = 1..6, H1 = 0.5 (the name k).
  const rows: string[] = [];
  for (let r = 1; r <= 6; r++) {
    let cells = cell(`A${r}`, `<v>${r}</v>`);
    // B: A*2 + k, moved down. C: a running sum over a range, moved down.
    cells += cell(`B${r}`, r === 1 ? shared(1, 'A1*2+k', 'B1:B6') : shared(1));
    cells += cell(`C${r}`, r === 1 ? shared(2, 'SUM($A$1:A1)', 'C1:C6') : shared(2));
    // D2:D4: A(r-1) + Data!$A$1, written in D2.
    if (r >= 2 && r <= 4) cells += cell(`D${r}`, r === 2 ? shared(3, 'A1+Data!$A$1', 'D2:D4') : shared(3));
    // F1:F2 and F3:F4 share si 7: the second block's own text from F3 on.
    if (r <= 4) cells += cell(`F${r}`, r === 1 ? shared(7, 'A1+100', 'F1:F2') : r === 3 ? shared(7, 'A3-100', 'F3:F4') : shared(7));
    // G1:G6: B - A, moved down.
    cells += cell(`G${r}`, r === 1 ? shared(5, 'B1-A1', 'G1:G6') : shared(5));
    if (r === 1) cells += cell('H1', '<v>0.5</v>');
    rows.push(`<row r="${r}">${cells}</row>`);
  }
  // Row 8: A1*1000 moved right (I8:K8 read A1, B1, C1); XFC8:XFD8: XFD1+1 moved right, past the last column in XFD8.
  rows.push(`<row r="8">${cell('I8', shared(6, 'A1*1000', 'I8:K8'))}${cell('J8', shared(6))}${cell('K8', shared(6))}`
    + `${cell('XFC8', shared(8, 'XFD1+1', 'XFC8:XFD8'))}${cell('XFD8', shared(8))}</row>`);
  return dataAnd2024Book("'2024'!$H$1", data, rows.join(''));
}

describe('shared formulas read once per block', () => {
  test('every cell shows what its own formula gives, and every cell of a block was read through its group', async () => {
    const pkg = await readPackage(await book(), 'test.xlsx');
    let grouped = 0;
    const { report, edits, engine } = await evaluateWorkbook(pkg, (content: EngineContent) => {
      const groupOf = content.formulaGroups!;
      const counted = { ...content, formulaGroups: (a: SimpleCellAddress, t: string) => {
        const group = groupOf(a, t);
        if (group !== undefined) grouped++;
        return group;
      } };
      // One function of our own: the engine makes a plugin, which is where the groups come in.
      return buildEngine({ functions: [{ id: 'ONE', name: 'ONE', parameters: [] }] }, { one: () => 1 }, () => ({ rows: 1, cols: 1 }), WORKBOOK_ENGINE_CONFIG, counted);
    });
    const value = (sheet: string, ref: string) => {
      const { row, col } = parseA1(ref);
      return edits.get(sheet)!.get(row)!.get(col)!.value;
    };
    expect(report.formulas).toBe(3 + 6 + 6 + 3 + 4 + 6 + 3 + 2);
    // Every cell of a block was read through its group, but XFD8 (moved to #REF!).
    expect(grouped).toBe(report.formulas - 1);
    expect([1, 2, 3].map((r) => value('Data', `B${r}`))).toEqual([{ number: 1001 }, { number: 1002 }, { number: 1003 }]);
    for (let r = 1; r <= 6; r++) {
      expect(value('2024', `B${r}`)).toEqual({ number: r * 2 + 0.5 });
      expect(value('2024', `C${r}`)).toEqual({ number: (r * (r + 1)) / 2 });
      expect(value('2024', `G${r}`)).toEqual({ number: r * 2 + 0.5 - r });
    }
    expect([2, 3, 4].map((r) => value('2024', `D${r}`))).toEqual([{ number: 1001 }, { number: 1002 }, { number: 1003 }]);
    expect(['F1', 'F2', 'F3', 'F4'].map((c) => value('2024', c))).toEqual([{ number: 101 }, { number: 102 }, { number: -97 }, { number: -96 }]);
    expect(['I8', 'J8', 'K8'].map((c) => value('2024', c))).toEqual([{ number: 1000 }, { number: 2500 }, { number: 1000 }]);
    expect(value('2024', 'XFC8')).toEqual({ number: 1 }); // XFD1 is empty
    expect(value('2024', 'XFD8')).toEqual({ error: '#REF!' });
    // The engine keeps each cell's own formula.
    expect(engine.getCellFormula({ sheet: engine.getSheetId('2024')!, row: 2, col: 1 })).toBe('=A3*2+k');
    expect(engine.getCellValue({ sheet: engine.getSheetId('2024')!, row: 7, col: 16383 })).toBeInstanceOf(DetailedCellError);
    engine.destroy();
  });
});
