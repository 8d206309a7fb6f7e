/**
 * `mixgap calc` on workbooks it has never seen, built here with ExcelJS: several sheets (one with a
 * space in its name), cross-sheet references, ranges, a defined name, a spilled GAPTABLE, built-in
 * functions over results, and cells that must show errors. Runs the built command as a user does
 * (`npm test` builds first) and reads the copy back with ExcelJS.
 *
 * Expected Mixgap values come from calling the cell functions directly in Node (the functions layer
 * over the core), expected built-in results from the same IEEE arithmetic here. Comparisons are
 * exact: the engine calls the very same implementations with the same doubles, and the file keeps
 * each number as its shortest round-trip text, so any difference is a wiring bug, not rounding.
 */
import { spawnSync } from 'child_process';
import { createHash } from 'crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, test } from 'vitest';
import * as fns from '../../src/functions/index';
import { call } from './support/call';

const root = path.join(__dirname, '..', '..');
const bin = path.join(root, 'bin', 'mixgap.js');

function mixgap(args: string[]) {
  const p = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: root });
  return { status: p.status, stdout: p.stdout, stderr: p.stderr };
}

const sha = (file: string) => createHash('sha256').update(readFileSync(file)).digest('hex');

/** The card as the cell functions receive it (a 2-D array of the range). */
const card = [['model', 'regular'], ['omega', 21], ['energy', 'kJ/mol'], ['temperature', '°C'], ['name A', 'Avarite']];
const rk = [[21000, 0, 0], [3000, 0, 0]];
const CARD = 'Inputs!$A$1:$B$5';
const temps = [500, 600, 700, 2000]; // °C; 2000 °C lies above the critical point (about 990 °C)

/** What a computed file holds in a cell: the cached result of a formula, or the plain value. */
function cached(ws: ExcelJS.Worksheet, address: string): unknown {
  const c = ws.getCell(address);
  // cell.result, not cell.value.result: ExcelJS leaves a cached 0 out of cell.value.
  return c.type === ExcelJS.ValueType.Formula ? c.result : c.value;
}

async function writeBook(file: string) {
  const wb = new ExcelJS.Workbook();
  const inputs = wb.addWorksheet('Inputs');
  card.forEach(([k, v], i) => { inputs.getCell(i + 1, 1).value = k; inputs.getCell(i + 1, 2).value = v; });
  temps.forEach((T, i) => { inputs.getCell(i + 1, 4).value = T; });
  rk.forEach((row, i) => row.forEach((v, j) => { inputs.getCell(i + 1, 7 + j).value = v; }));

  const calc = wb.addWorksheet('Calc Sheet');
  temps.forEach((_, i) => {
    const r = i + 1;
    calc.getCell(`A${r}`).value = { formula: `Inputs!D${r}` } as ExcelJS.CellFormulaValue;
    calc.getCell(`B${r}`).value = { formula: `MIXGAP.GAPLOW(A${r}, ${CARD})` } as ExcelJS.CellFormulaValue;
    calc.getCell(`C${r}`).value = { formula: `MIXGAP.GAPHIGH('Calc Sheet'!A${r}, ${CARD})` } as ExcelJS.CellFormulaValue;
  });
  calc.getCell('D1').value = { formula: 'SUM(B1:B3)' } as ExcelJS.CellFormulaValue;
  calc.getCell('D2').value = { formula: 'MIXGAP.XCRIT(CardName)' } as ExcelJS.CellFormulaValue;
  calc.getCell('D3').value = { formula: 'MIXGAP.TCRIT(Inputs!G1:I2)' } as ExcelJS.CellFormulaValue;
  calc.getCell('D4').value = { formula: `MIXGAP.PHASEFRAC(0.3, 600, ${CARD}, "high")` } as ExcelJS.CellFormulaValue;
  calc.getCell('E1').value = { formula: '1/0' } as ExcelJS.CellFormulaValue;
  calc.getCell('E2').value = { formula: `MIXGAP.GAPLOW(-400, ${CARD})` } as ExcelJS.CellFormulaValue;
  // The row count taken from a cell: the embedded engine cannot size the spill and says so.
  calc.getCell('E3').value = { formula: `MIXGAP.GAPTABLE(500, 600, Inputs!D1, ${CARD})` } as ExcelJS.CellFormulaValue;
  calc.getCell('E4').value = { formula: 'NOSUCHFUNCTION(1)' } as ExcelJS.CellFormulaValue;
  calc.getCell('F1').value = 'a note that stays text';
  calc.getCell('F2').value = '123'; // text that reads as a number stays text

  const table = wb.addWorksheet('Table');
  table.getCell('A1').value = 'T (°C)';
  table.getCell('A2').value = { formula: `MIXGAP.GAPTABLE(400, 1100, 8, ${CARD})` } as ExcelJS.CellFormulaValue;
  table.getCell('G2').value = { formula: 'SUM(B2:B4)' } as ExcelJS.CellFormulaValue;
  table.getCell('G3').value = { formula: "'Calc Sheet'!B2*2" } as ExcelJS.CellFormulaValue;

  wb.definedNames.add(CARD, 'CardName');
  await wb.xlsx.writeFile(file);
}

let dir: string;
let input: string;
let output: string;
let run: ReturnType<typeof mixgap>;
let before: string;
let out: ExcelJS.Workbook;

beforeAll(async () => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-calc-'));
  input = path.join(dir, 'unseen.xlsx');
  await writeBook(input);
  before = sha(input);
  run = mixgap(['calc', input]);
  output = path.join(dir, 'unseen.computed.xlsx');
  out = new ExcelJS.Workbook();
  if (existsSync(output)) await out.xlsx.readFile(output);
}, 60_000);

describe('mixgap calc on an unseen workbook', () => {
  test('writes <name>.computed.xlsx beside the input and leaves the input as it was', () => {
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(existsSync(output)).toBe(true);
    expect(sha(input)).toBe(before);
    expect(readdirSync(dir).sort()).toEqual(['unseen.computed.xlsx', 'unseen.xlsx']); // no temporary file left
  });

  test('Mixgap formulas across sheets keep their text and carry the values of the cell functions', () => {
    const ws = out.getWorksheet('Calc Sheet')!;
    temps.forEach((T, i) => {
      const r = i + 1;
      expect(ws.getCell(`B${r}`).formula).toBe(`MIXGAP.GAPLOW(A${r}, ${CARD})`);
      expect(cached(ws, `A${r}`)).toBe(T);
      expect(cached(ws, `B${r}`)).toEqual(call(fns.gapLow, T, card));
      expect(cached(ws, `C${r}`)).toEqual(call(fns.gapHigh, T, card));
    });
    expect(cached(ws, 'B4')).toEqual({ error: '#N/A' }); // no gap above the critical point
    expect(cached(ws, 'D2')).toBe(call(fns.xCrit, card)); // through the defined name
    expect(cached(ws, 'D3')).toBe(call(fns.tCrit, rk)); // a numeric Redlich–Kister range
    expect(cached(ws, 'D4')).toBe(call(fns.phaseFrac, 0.3, 600, card, 'high'));
  });

  test('built-in functions over Mixgap results and references across sheets', () => {
    const ws = out.getWorksheet('Calc Sheet')!;
    const low = [500, 600, 700].map((T) => fns.gapLow(T, card));
    expect(cached(ws, 'D1')).toBe(low[0] + low[1] + low[2]); // SUM adds left to right, as here
    const table = out.getWorksheet('Table')!;
    expect(cached(table, 'G3')).toBe(low[1] * 2);
  });

  test('a spilled GAPTABLE fills its cells; the anchor keeps the formula as an array formula over them', () => {
    const ws = out.getWorksheet('Table')!;
    const expected = fns.gapTable(400, 1100, 8, card) as unknown[][];
    const anchor = ws.getCell('A2');
    expect(anchor.formula).toBe(`MIXGAP.GAPTABLE(400, 1100, 8, ${CARD})`);
    expect((anchor.model as { shareType?: string; ref?: string }).shareType).toBe('array');
    expect((anchor.model as { ref?: string }).ref).toBe('A2:E9');
    const cols = 'ABCDE';
    expected.forEach((row, i) => row.forEach((v, j) => {
      const got = cached(ws, `${cols[j]}${i + 2}`);
      if (typeof v === 'number') expect(got, `${cols[j]}${i + 2}`).toBe(v);
      else expect(got, `${cols[j]}${i + 2}`).toEqual({ error: '#N/A' }); // no gap at that temperature
    }));
    expect(expected.some((row) => typeof row[1] !== 'number')).toBe(true); // the table does reach above the gap
    expect(ws.getCell('A10').value).toBe(null);
    expect(ws.getCell('F2').value).toBe(null);
    expect(cached(ws, 'G2')).toBe((expected[0][1] as number) + (expected[1][1] as number) + (expected[2][1] as number));
  });

  test('errors are stored as error values and summarised by kind with what to fix', () => {
    const ws = out.getWorksheet('Calc Sheet')!;
    expect(cached(ws, 'E1')).toEqual({ error: '#DIV/0!' });
    expect(cached(ws, 'E2')).toEqual({ error: '#NUM!' });
    expect(cached(ws, 'E3')).toEqual({ error: '#VALUE!' });
    expect(cached(ws, 'E4')).toEqual({ error: '#NAME?' });
    expect(run.stdout).toMatch(/sheets +3 \(Inputs, Calc Sheet, Table\)/);
    expect(run.stdout).toMatch(/formulas +23 evaluated; 1 spilled over 39 more cells/);
    // B4, C4 (#N/A), E1, E2, E3, E4: six formula cells; #N/A cells of the table counted apart.
    expect(run.stdout).toMatch(/errors +6 formula cells \(#N\/A 2, (#DIV\/0! 1|#NUM! 1|#VALUE! 1|#NAME\? 1)(, (#DIV\/0! 1|#NUM! 1|#VALUE! 1|#NAME\? 1)){3}\)/);
    expect(run.stdout).toMatch(/Calc Sheet!E3 +#VALUE! +GAPTABLE: write the number of rows/);
    expect(run.stdout).toMatch(/Calc Sheet!E1 +#DIV\/0! +division by zero/);
  });

  test('plain values stay as they were: text that looks like a number stays text', () => {
    const ws = out.getWorksheet('Calc Sheet')!;
    expect(ws.getCell('F1').value).toBe('a note that stays text');
    expect(ws.getCell('F2').value).toBe('123');
  });

  test('a computed copy computes again to the same values (cached spills do not block the table)', async () => {
    const again = path.join(dir, 'again', 'x.xlsx');
    const r = mixgap(['calc', output, '-o', again]);
    expect(r.status).toBe(0);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(again);
    for (const name of ['Calc Sheet', 'Table']) {
      const a = out.getWorksheet(name)!, b = wb.getWorksheet(name)!;
      a.eachRow((row) => row.eachCell((c) => {
        expect(cached(b, c.address), `${name}!${c.address}`).toEqual(cached(a, c.address));
      }));
    }
  });
});

describe('mixgap calc failures', () => {
  test('a spill blocked by a value shows #SPILL! in the summary, naming the blocking cell, and #REF! in the file', async () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-spill-'));
    const file = path.join(d, 'blocked.xlsx');
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('S');
    ws.getCell('A1').value = { formula: 'SEQUENCE(3)' } as ExcelJS.CellFormulaValue;
    ws.getCell('A2').value = 7;
    const two = wb.addWorksheet('T');
    two.getCell('A1').value = { formula: 'SEQUENCE(2,3)' } as ExcelJS.CellFormulaValue;
    two.getCell('B1').value = 'in the way';
    two.getCell('C2').value = { formula: '1+1' } as ExcelJS.CellFormulaValue;
    await wb.xlsx.writeFile(file);
    const r = mixgap(['calc', file, '-o', `${d}/`]);
    expect(r.status).toBe(0);
    // The summary names the cell in the way (A2) and the range the result needs (A1:A3).
    expect(r.stdout).toMatch(/S!A1 +#SPILL! +no room for the spilled result \(A1:A3\): A2 is not empty; clear it or move the formula/);
    expect(r.stdout).toMatch(/T!A1 +#SPILL! +no room for the spilled result \(A1:C2\): B1, C2 are not empty; clear them/);
    const back = new ExcelJS.Workbook();
    await back.xlsx.readFile(path.join(d, 'blocked.computed.xlsx'));
    expect(cached(back.getWorksheet('S')!, 'A1')).toEqual({ error: '#REF!' });
    expect(back.getWorksheet('S')!.getCell('A2').value).toBe(7);
  });

  test('a file that is not a workbook: exit 1, a message, no output and no temporary file', () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-bad-'));
    const file = path.join(d, 'broken.xlsx');
    writeFileSync(file, 'this is not a zip file');
    const r = mixgap(['calc', file]);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/^mixgap: .*broken\.xlsx: not an \.xlsx workbook, or damaged/);
    expect(readdirSync(d)).toEqual(['broken.xlsx']);
  });

  test('a damaged workbook (cut short) and a package of another kind say the same, and what they are', async () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-damaged-'));
    const whole = readFileSync(input);
    writeFileSync(path.join(d, 'cut.xlsx'), whole.subarray(0, Math.floor(whole.length / 2)));
    const JSZip = (await import('jszip')).default;
    const doc = new JSZip(); // the skeleton of a text document: a package, but not a workbook
    doc.file('_rels/.rels', '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="word/document.xml"/></Relationships>');
    doc.file('word/document.xml', '<w:document xmlns:w="http://schemas.openxmlformats.org/wordprocessingml/2006/main"><w:body/></w:document>');
    writeFileSync(path.join(d, 'letter.xlsx'), await doc.generateAsync({ type: 'nodebuffer' }));
    for (const name of ['cut.xlsx', 'letter.xlsx']) {
      const r = mixgap(['calc', path.join(d, name)]);
      expect(r.status, name).toBe(1);
      expect(r.stderr, name).toMatch(new RegExp(`${name.replace('.', '\\.')}: not an \\.xlsx workbook, or damaged`));
    }
    expect(readdirSync(d).sort()).toEqual(['cut.xlsx', 'letter.xlsx']);
  });

  test('an output folder that cannot be written is named (not a temporary file)', () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-nowrite-'));
    const blocker = path.join(d, 'results');
    writeFileSync(blocker, 'a file where a folder should be');
    const r = mixgap(['calc', input, '-o', path.join(blocker, 'run7', 'out.xlsx')]);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain(`cannot write to ${path.join(blocker, 'run7')}`);
    expect(r.stderr).not.toMatch(/\.tmp/);
  });

  test('an output format calc does not write is refused, naming the ones it does', () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-csv-'));
    const r = mixgap(['calc', input, '-o', path.join(d, 'out.csv')]);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/out\.csv: mixgap calc writes \.xlsx \(\.xlsm for a workbook with macros\)/);
    expect(readdirSync(d)).toEqual([]);
  });

  test('refuses to write over its input', () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-same-'));
    const file = path.join(d, 'same.xlsx');
    writeFileSync(file, 'x');
    const r = mixgap(['calc', file, '-o', file]);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/never overwrites its input/);
    expect(readFileSync(file, 'utf8')).toBe('x');
  });
});
