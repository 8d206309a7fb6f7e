/**
 * Patching a worksheet part in place (src/hosts/xlsx-package.ts) on layouts the end-to-end tests
 * do not build: prefixed element names, an empty sheet, rows and cells without their `r`, text
 * that needs escaping. The layout rules are those of ECMA-376 Part 1 (2016), §18.3.1 (sheetData,
 * row, c: rows in ascending order, cells in ascending column order, `r` optional; section number
 * from memory).
 */
import { DOMParser } from '@xmldom/xmldom';
import { describe, expect, test } from 'vitest';
import { parseSheet, patchSheet } from '../../src/hosts/xlsx-package';
import type { CellEdit } from '../../src/hosts/xlsx-package';

const NS = 'http://schemas.openxmlformats.org/spreadsheetml/2006/main';

function edits(list: Array<[number, number, CellEdit]>): Map<number, Map<number, CellEdit>> {
  const m = new Map<number, Map<number, CellEdit>>();
  for (const [r, c, e] of list) {
    if (!m.has(r)) m.set(r, new Map());
    m.get(r)!.set(c, e);
  }
  return m;
}

/** Cells of a part as [address, type, value or inline text], read with xmldom (namespace-aware). */
function read(xml: string): Array<[string, string | null, string | null]> {
  const doc = new DOMParser().parseFromString(xml, 'text/xml');
  const list = doc.getElementsByTagNameNS(NS, 'c');
  const out: Array<[string, string | null, string | null]> = [];
  for (let i = 0; i < list.length; i++) {
    const c = list[i];
    const v = c.getElementsByTagNameNS(NS, 'v')[0] ?? c.getElementsByTagNameNS(NS, 't')[0];
    out.push([c.getAttribute('r') ?? '?', c.getAttribute('t'), v?.textContent ?? null]);
  }
  return out;
}

describe('patchSheet', () => {
  test('a prefixed part gets prefixed new rows and cells, in order', () => {
    const xml = `<x:worksheet xmlns:x="${NS}"><x:dimension ref="A1:B2"/><x:sheetData><x:row r="1"><x:c r="A1"><x:f>SEQUENCE(3)</x:f><x:v>1</x:v></x:c></x:row>`
      + '<x:row r="4"><x:c r="B4" t="s"><x:v>0</x:v></x:c></x:row></x:sheetData></x:worksheet>';
    const sheet = parseSheet('S', 'xl/worksheets/sheet1.xml', xml);
    const out = patchSheet(sheet, edits([
      [0, 0, { value: { number: 1 }, arrayRef: 'A1:A3' }],
      [1, 0, { value: { number: 2 } }],
      [2, 0, { value: { text: 'a < b & "c"' } }],
      [3, 0, { value: { boolean: true } }],
    ]));
    expect(read(out)).toEqual([['A1', null, '1'], ['A2', null, '2'], ['A3', 'inlineStr', 'a < b & "c"'], ['A4', 'b', '1'], ['B4', 's', '0']]);
    expect(out).toContain('<x:f t="array" ref="A1:A3">SEQUENCE(3)</x:f>');
    expect(out).toContain('<x:dimension ref="A1:B4"/>');
  });

  test('an empty sheet (self-closing sheetData) gets its first rows', () => {
    const xml = `<worksheet xmlns="${NS}"><sheetData/><pageMargins left="0.7"/></worksheet>`;
    const out = patchSheet(parseSheet('S', 'p', xml), edits([[1, 2, { value: { error: '#N/A' } }], [0, 0, { value: { number: -0 } }]]));
    expect(read(out)).toEqual([['A1', null, '0'], ['C2', 'e', '#N/A']]);
    expect(out.endsWith('</sheetData><pageMargins left="0.7"/></worksheet>')).toBe(true);
  });

  test('rows and cells without `r` are placed by position, and get an `r` when a cell is put between them', () => {
    const xml = `<worksheet xmlns="${NS}"><sheetData><row><c><v>1</v></c><c s="3"><f>A1*2</f><v>0</v></c><c><v>5</v></c></row><row/></sheetData></worksheet>`;
    const sheet = parseSheet('S', 'p', xml);
    expect(sheet.rows.map((r) => r.row)).toEqual([0, 1]);
    expect(sheet.rows[0].cells.map((c) => [c.row, c.col, c.formula?.text])).toEqual([[0, 0, undefined], [0, 1, 'A1*2'], [0, 2, undefined]]);
    const out = patchSheet(sheet, edits([[0, 1, { value: { number: 2 } }], [0, 4, { value: { text: ' x ' } }], [1, 1, { value: { number: 7 } }]]));
    expect(read(out)).toEqual([['A1', null, '1'], ['B1', null, '2'], ['C1', null, '5'], ['E1', 'inlineStr', ' x '], ['B2', null, '7']]);
    expect(out).toContain('<c r="B1" s="3"><f>A1*2</f><v>2</v></c>');
    expect(out).toContain('<t xml:space="preserve"> x </t>');
  });

  test('a formula cell whose result is empty loses its value and type, and keeps its style and formula', () => {
    const xml = `<worksheet xmlns="${NS}"><sheetData><row r="2"><c r="C2" s="1" t="str"><f>IF(1,"")</f><v>old</v></c></row></sheetData></worksheet>`;
    const out = patchSheet(parseSheet('S', 'p', xml), edits([[1, 2, { value: { empty: true } }]]));
    expect(out).toContain('<row r="2"><c r="C2" s="1"><f>IF(1,"")</f></c></row>');
  });
});

describe('numbers in the file', () => {
  test('every double is written as text that reads back as the same double', () => {
    // IEEE 754 doubles (IEEE 754-2019): the smallest subnormal, the largest finite, and values whose
    // shortest decimal needs an exponent; Number() of the text must give the same bits.
    const xml = `<worksheet xmlns="${NS}"><sheetData/></worksheet>`;
    const values = [5e-324, 1.7976931348623157e308, 4e-11, 1e21, 0.1 + 0.2, -123.456e-7, 2 / 3];
    const out = patchSheet(parseSheet('S', 'p', xml), edits(values.map((n, i) => [i, 0, { value: { number: n } }] as [number, number, CellEdit])));
    const back = read(out).map(([, , v]) => Number(v));
    expect(back).toEqual(values);
    expect(out).toContain('<v>1E+21</v>');
  });
});
