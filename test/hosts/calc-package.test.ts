/**
 * `mixgap calc` keeps everything of a workbook: on workbooks laid out as another xlsx writer does
 * (test/hosts/fixtures/other-writer.ts: a scatter chart and a picture, a comment, a list
 * validation, a conditional format, defined names, a pivot table, shared strings, a shared formula;
 * and the same as an .xlsm with a macro project), every part of the copy except the worksheets'
 * cell data is byte-identical to the input's, and the cells hold the right values.
 *
 * The copy is read back with @xmldom/xmldom, not with the reader `calc` uses. Expected Mixgap
 * values come from calling the cell functions directly (the same implementations, the same
 * doubles: comparisons are exact); built-in results from the same IEEE arithmetic here.
 */
import { spawnSync } from 'child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { DOMParser } from '@xmldom/xmldom';
import type { Element as XmlElement } from '@xmldom/xmldom';
import JSZip from 'jszip';
import { beforeAll, describe, expect, test } from 'vitest';
import * as fns from '../../src/functions/index';
import { CARD, otherWriterWorkbook, TEMPS, VBA_BYTES } from './fixtures/other-writer';
import { call } from './support/call';

const root = path.join(__dirname, '..', '..');
const bin = path.join(root, 'bin', 'mixgap.js');

function mixgap(args: string[]) {
  const p = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: root });
  return { status: p.status, stdout: p.stdout, stderr: p.stderr };
}

/** Every file entry of a zip: name -> bytes. */
async function entries(file: string): Promise<Map<string, Buffer>> {
  const zip = await JSZip.loadAsync(readFileSync(file));
  const out = new Map<string, Buffer>();
  for (const [name, entry] of Object.entries(zip.files)) if (!entry.dir) out.set(name, await entry.async('nodebuffer'));
  return out;
}

/** A worksheet part without its cell data and its dimension: what must not change. */
const outsideCells = (xml: string) => xml.replace(/<sheetData>[\s\S]*<\/sheetData>|<sheetData\/>/, '').replace(/<dimension [^>]*\/>/, '');

type Cell = { t: string | null; v: string | null; f: XmlElement | null; text: string | null };

/** The cells of a worksheet part by address, read with xmldom. */
function cells(xml: string): Map<string, Cell> {
  const doc = new DOMParser().parseFromString(xml, 'text/xml');
  const out = new Map<string, Cell>();
  const list = doc.getElementsByTagName('c');
  for (let i = 0; i < list.length; i++) {
    const c = list[i];
    const child = (name: string) => c.getElementsByTagName(name)[0] ?? null;
    out.set(c.getAttribute('r')!, { t: c.getAttribute('t'), v: child('v')?.textContent ?? null, f: child('f'), text: child('t')?.textContent ?? null });
  }
  return out;
}

/** The value a cell of the copy shows, as the cell functions give it (a number, text, boolean or {error}). */
function shown(c: Cell | undefined): unknown {
  if (!c) return undefined;
  switch (c.t) {
    case 'e': return { error: c.v };
    case 'b': return c.v === '1';
    case 'str': return c.v;
    case 'inlineStr': return c.text;
    default: return c.v === null ? null : Number(c.v);
  }
}

const cellOf = (v: unknown) => (v && typeof v === 'object' && 'code' in (v as object) ? { error: (v as { code: string }).code } : v);

let dir: string;
let before: Map<string, Buffer>;
let after: Map<string, Buffer>;
let run: ReturnType<typeof mixgap>;

beforeAll(async () => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-keep-'));
  writeFileSync(path.join(dir, 'other.xlsx'), await otherWriterWorkbook());
  run = mixgap(['calc', path.join(dir, 'other.xlsx')]);
  before = await entries(path.join(dir, 'other.xlsx'));
  after = await entries(path.join(dir, 'other.computed.xlsx'));
}, 60_000);

describe('mixgap calc keeps every part of a workbook from another writer', () => {
  test('writes the copy beside the input (a chart drawing in the default namespace is no obstacle)', () => {
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['other.computed.xlsx', 'other.xlsx']);
  });

  test('the summary says what is kept as it was although it may show the input\'s numbers', () => {
    expect(run.stdout).toMatch(/note +1 chart carried over as it was: its cached series show the input's numbers until the spreadsheet program refreshes them/);
    expect(run.stdout).toMatch(/note +1 pivot cache carried over as it was/);
  });

  test('the same parts, and every part but the worksheets byte for byte', () => {
    expect([...after.keys()].sort()).toEqual([...before.keys()].sort());
    for (const [name, bytes] of before) {
      if (/^xl\/worksheets\/sheet\d+\.xml$/.test(name)) continue;
      expect(after.get(name)!.equals(bytes), name).toBe(true);
    }
    // A sheet without formulas is not touched at all.
    expect(after.get('xl/worksheets/sheet1.xml')!.equals(before.get('xl/worksheets/sheet1.xml')!)).toBe(true);
  });

  test('in a sheet with formulas only the cell data and its dimension change', () => {
    const a = before.get('xl/worksheets/sheet2.xml')!.toString('utf8'), b = after.get('xl/worksheets/sheet2.xml')!.toString('utf8');
    expect(outsideCells(b)).toBe(outsideCells(a));
    expect(b).toMatch(/<dimension ref="A1:E10"\/>/); // grown over the spilled table (A7:E10)
  });

  test('formulas keep their text (shared formulas stay shared) and carry the computed values', () => {
    const c = cells(after.get('xl/worksheets/sheet2.xml')!.toString('utf8'));
    TEMPS.forEach((T, i) => {
      const r = i + 1;
      expect(shown(c.get(`A${r}`))).toBe(T);
      expect(shown(c.get(`B${r}`)), `B${r}`).toEqual(call(fns.gapLow, T, CARD));
      expect(shown(c.get(`C${r}`)), `C${r}`).toEqual(call(fns.gapHigh, T, CARD));
      expect(c.get(`B${r}`)!.f!.getAttribute('t')).toBe('shared');
      expect(c.get(`C${r}`)!.f!.textContent).toBe(`_xldudf_MIXGAP_GAPHIGH(A${r},Inputs!$A$1:$B$5)`);
    });
    expect(c.get('B1')!.f!.textContent).toBe('MIXGAP.GAPLOW(A1,Card)');
    expect(c.get('B2')!.f!.textContent).toBe('');
    expect(shown(c.get('B4'))).toEqual({ error: '#N/A' }); // 2000 °C: above the critical point, no gap
    expect(c.get('B1')!.v).not.toBe('999'); // the stale cached value is replaced
    expect(c.get('E1')).toMatchObject({ t: 'str', v: 'T = 500 °C' });
    expect(c.get('E2')).toMatchObject({ t: 'b', v: String(Number(call(fns.gapLow, 600, CARD) as number < (call(fns.gapHigh, 600, CARD) as number))) });
    expect(c.get('E3')).toMatchObject({ t: 'e', v: '#DIV/0!' });
  });

  test('a spilled table fills rows and cells the file did not have, in order', () => {
    const xml = after.get('xl/worksheets/sheet2.xml')!.toString('utf8');
    const c = cells(xml);
    const expected = fns.gapTable(400, 1100, 4, CARD) as unknown[][];
    expect(c.get('A7')!.f!.getAttribute('t')).toBe('array');
    expect(c.get('A7')!.f!.getAttribute('ref')).toBe('A7:E10');
    const cols = 'ABCDE';
    expected.forEach((row, i) => row.forEach((v, j) => {
      expect(shown(c.get(`${cols[j]}${i + 7}`)), `${cols[j]}${i + 7}`).toEqual(cellOf(v));
    }));
    const rowNumbers = [...xml.matchAll(/<row r="(\d+)"/g)].map((m) => Number(m[1]));
    expect(rowNumbers).toEqual([1, 2, 3, 4, 6, 7, 8, 9, 10]);
    // Cells in each row are in column order.
    for (const row of xml.match(/<row [^>]*>.*?<\/row>/g)!) {
      const refs = [...row.matchAll(/<c r="([A-Z]+)\d+"/g)].map((m) => m[1]);
      expect(refs).toEqual([...refs].sort());
    }
  });

  test('a second run on the copy gives the same cells (its cached table does not block the new one)', async () => {
    const again = path.join(dir, 'again', 'other2.xlsx');
    const r = mixgap(['calc', path.join(dir, 'other.computed.xlsx'), '-o', again]);
    expect(r.status).toBe(0);
    const twice = await entries(again);
    expect(twice.get('xl/worksheets/sheet2.xml')!.toString('utf8')).toBe(after.get('xl/worksheets/sheet2.xml')!.toString('utf8'));
  });
});

describe('mixgap calc on an .xlsm', () => {
  test('the copy is an .xlsm with the macro project and every other part unchanged', async () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-xlsm-'));
    const input = path.join(d, 'macros.xlsm');
    writeFileSync(input, await otherWriterWorkbook({ macros: true }));
    const r = mixgap(['calc', input, '-o', `${d}${path.sep}out${path.sep}`]);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const copy = path.join(d, 'out', 'macros.computed.xlsm');
    const a = await entries(input), b = await entries(copy);
    expect(b.get('xl/vbaProject.bin')!.equals(VBA_BYTES)).toBe(true);
    expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
    for (const [name, bytes] of a) if (!/^xl\/worksheets\/sheet\d+\.xml$/.test(name)) expect(b.get(name)!.equals(bytes), name).toBe(true);
    expect(shown(cells(b.get('xl/worksheets/sheet2.xml')!.toString('utf8')).get('B3'))).toBe(fns.gapLow(700, CARD));
  });

  test('an .xlsx name for the copy of a workbook with macros is refused, saying why', async () => {
    const d = mkdtempSync(path.join(os.tmpdir(), 'mixgap-xlsm-'));
    const input = path.join(d, 'macros.xlsm');
    writeFileSync(input, await otherWriterWorkbook({ macros: true }));
    const r = mixgap(['calc', input, '-o', path.join(d, 'copy.xlsx')]);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/has macros.*must be an \.xlsm/);
    expect(readdirSync(d)).toEqual(['macros.xlsm']);
  });
});
