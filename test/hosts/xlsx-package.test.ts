/**
 * Patching a worksheet part in place (src/hosts/xlsx-package.ts) on layouts the end-to-end tests
 * do not build: prefixed element names, an empty sheet, rows and cells without their `r`, text
 * that needs escaping. The layout rules are those of ECMA-376 Part 1 (2016), §18.3.1 (sheetData,
 * row, c: rows in ascending order, cells in ascending column order, `r` optional; section number
 * from memory).
 */
import { DOMParser } from '@xmldom/xmldom';
import type { Element as XmlElement, Node as XmlNode } from '@xmldom/xmldom';
import fc from 'fast-check';
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

describe('parseSheet against a namespace-aware XML parser', () => {
  // Random worksheet layouts (seed 20261203): prefixed or not, rows and cells with and without `r`,
  // self-closing cells and children, formulas, inline rich text with phonetic runs, escapes, comments
  // and CDATA holding tags, and attribute values holding `>` and `/>`. Every cell xmldom finds must
  // be read with the same address, type, value, inline text and formula text.
  // A cell's children in the schema's order: at most one formula, one value or inline string, and extensions.
  const formulas = ['<f>A1*2</f>', '<f/>', '<f t="array" ref="A1:A3">SEQUENCE(3)</f>', '<f>"a&quot;b&gt;"&amp;C1</f>'];
  const values = ['<v>1</v>', '<v/>', '<v>&lt;&amp;&#65;&#x42;</v>', '<is><t>x</t></is>',
    '<is><r><t>a</t></r><rPh sb="0"><t>p</t></rPh><r><t xml:space="preserve"> b</t></r></is>'];
  const extension = '<extLst><ext uri="{a>b/>}"><q:x xmlns:q="urn:q" a="&lt;>"/></ext></extLst>';
  const between = ['', '<!-- <c r="Z9"><v>9</v></c> -->', ' ', '\n  '];
  const cellAttrs = ['', ' s="1"', ' t="s"', ' t="str"', " t='b'", ' t="e"', ' t="inlineStr"', ' cm="1" vm=">"'];
  const layout = fc.record({
    prefixed: fc.boolean(),
    rows: fc.array(fc.record({
      gap: fc.integer({ min: 1, max: 3 }),
      withRef: fc.boolean(),
      cells: fc.array(fc.record({
        gap: fc.integer({ min: 1, max: 2 }),
        withRef: fc.boolean(),
        attrs: fc.constantFrom(...cellAttrs),
        selfClosing: fc.boolean(),
        formula: fc.option(fc.constantFrom(...formulas)),
        value: fc.option(fc.constantFrom(...values)),
        extended: fc.boolean(),
        before: fc.constantFrom(...between),
      }), { maxLength: 5 }),
    }), { maxLength: 6 }),
  });
  type Layout = typeof layout extends fc.Arbitrary<infer T> ? T : never;
  const sheetXml = (l: Layout): string => {
    const p = l.prefixed ? 'x:' : '';
    const pre = (s: string) => (p ? s.replace(/<(\/?)(?=[a-zA-Z])(?!q:)/g, `<$1${p}`) : s);
    let body = '';
    let r = 0;
    for (const row of l.rows) {
      r += row.gap;
      let c = 0;
      let cells = '';
      for (const cell of row.cells) {
        c += cell.gap;
        const ref = cell.withRef && row.withRef ? ` r="${String.fromCharCode(64 + c)}${r}"` : '';
        cells += pre(cell.before) + (cell.selfClosing
          ? `<${p}c${ref}${cell.attrs}/>`
          : `<${p}c${ref}${cell.attrs}>${pre((cell.formula ?? '') + (cell.value ?? '') + (cell.extended ? extension : ''))}</${p}c>`);
      }
      body += `<${p}row${row.withRef ? ` r="${r}"` : ''}>${cells}</${p}row>`;
    }
    const ns = p ? `xmlns:x="${NS}"` : `xmlns="${NS}"`;
    return `<?xml version="1.0"?><${p}worksheet ${ns}><!-- <sheetData/> --><${p}sheetData>${body}</${p}sheetData><![CDATA[<c r="A1"/>]]></${p}worksheet>`;
  };
  const isElement = (n: XmlNode | null, local: string): n is XmlElement => n?.nodeType === 1 && (n as XmlElement).localName === local;
  /** What xmldom reads of every cell: [row, col, t, v, inline text, formula text] (positions by the layout rules). */
  const expected = (xml: string) => {
    const doc = new DOMParser().parseFromString(xml, 'text/xml');
    const out: unknown[] = [];
    const rows = doc.getElementsByTagNameNS(NS, 'row');
    let nextRow = 0;
    for (let i = 0; i < rows.length; i++) {
      const row = rows[i];
      const index = row.getAttribute('r') ? Number(row.getAttribute('r')) - 1 : nextRow;
      nextRow = index + 1;
      let nextCol = 0;
      for (let c: XmlNode | null = row.firstChild; c; c = c.nextSibling) {
        if (!isElement(c, 'c')) continue;
        const cell = c;
        const ref = cell.getAttribute('r');
        const col = ref ? ref.charCodeAt(0) - 65 : nextCol;
        nextCol = col + 1;
        const child = (name: string) => {
          for (let k: XmlNode | null = cell.firstChild; k; k = k.nextSibling) if (isElement(k, name) && k.namespaceURI === NS) return k;
          return undefined;
        };
        const is = child('is');
        let inline: string | undefined;
        if (is) {
          inline = '';
          const ts = is.getElementsByTagNameNS(NS, 't');
          for (let k = 0; k < ts.length; k++) if (!isElement(ts[k].parentNode, 'rPh')) inline += ts[k].textContent;
        }
        out.push([index, col, cell.getAttribute('t') || undefined, child('v')?.textContent ?? undefined, inline, child('f')?.textContent ?? undefined]);
      }
    }
    return out;
  };
  test('every cell is read as xmldom reads it', () => {
    fc.assert(fc.property(layout, (l) => {
      const xml = sheetXml(l);
      const got = parseSheet('S', 'p', xml).rows.flatMap((r) => r.cells.map((c) => [c.row, c.col, c.type, c.value, c.inline, c.formula?.text]));
      expect(got).toEqual(expected(xml));
    }), { seed: 20261203, numRuns: 300 });
  });
});
