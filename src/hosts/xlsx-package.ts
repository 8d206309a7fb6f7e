/**
 * An .xlsx (or .xlsm) package read and patched in place. An xlsx is a zip of XML parts; this module
 * reads the few parts that hold cells (the workbook part, its relationships, the shared strings and
 * each worksheet), and writes a copy in which only the cells given are changed: every other part
 * (styles, comments, drawings, charts, pivot tables, macros, ...) and every other byte of the
 * worksheets is copied as it was. Knows nothing of formulas' meaning or of the engine.
 */
import path from 'path';
import { crc32, deflateRawSync, inflateRawSync } from 'zlib';
import JSZip from 'jszip';
import { a1, parseA1, parseRange, slider } from './a1';
import { attribute, attributeIn, encodeXstring, runText, TagCursor, tags, unescapeXml } from './xml';
import type { Tag } from './xml';

/** The input is not a workbook package (not a zip, or a zip without a readable workbook part). */
export class NotAWorkbookError extends Error {}

/** A formula as a cell of the file stores it. */
export interface FileFormula {
  /** As written (no leading "="); for a cell of a shared formula, moved to this cell. */
  text: string;
  /** `normal`, `array` (a range computed by one formula), `shared` (one text for a block) or `dataTable`. */
  kind: string;
  /** The range of an array formula. */
  ref?: string;
  /**
   * For the cells of a shared formula: a number that cells holding the same formula, moved, share
   * (one per block of the sheet). Left out where moving made a reference #REF!.
   */
  group?: number;
}

/** One cell element of a worksheet, with where it sits in the part's text. */
export interface FileCell {
  row: number; // 0-based
  col: number; // 0-based
  start: number;
  end: number;
  /** Qualified tag name (`c`, or `x:c` in a prefixed part). */
  tag: string;
  /** Whether the tag carries its own `r`. */
  hasRef: boolean;
  /** The `t` attribute: s, str, inlineStr, b, e, n, d; undefined is a number. */
  type?: string;
  /** Text of the `v` element (unescaped), undefined when there is none. */
  value?: string;
  /** Text of an inline string (`is`). */
  inline?: string;
  formula?: FileFormula;
  /** End of the start tag (the whole element when self-closing); child elements lie between it and the end tag. */
  openEnd: number;
}

interface FileRow {
  row: number; // 0-based
  start: number;
  /** End of the start tag (the whole element when self-closing). */
  openEnd: number;
  end: number;
  selfClosing: boolean;
  tag: string;
  cells: FileCell[];
}

/** One worksheet part. */
export interface SheetPart {
  name: string;
  /** Path of the part inside the zip, e.g. xl/worksheets/sheet1.xml. */
  path: string;
  xml: string;
  rows: FileRow[];
  /** Namespace prefix of the sheet's elements (`` or `x:`). */
  prefix: string;
  sheetData: { start: number; openEnd: number; end: number; selfClosing: boolean };
  dimension?: { start: number; end: number; attrText: string };
}

/** A defined name of the workbook. */
export interface DefinedName {
  name: string;
  /** Its formula, as written. */
  text: string;
  /** Index of the sheet it belongs to (into `sheetNames`), or undefined for a workbook-wide name. */
  localSheet?: number;
}

export interface WorkbookPackage {
  zip: JSZip;
  /** Worksheets, in the workbook's order (chart sheets and others left out). */
  sheets: SheetPart[];
  /** Every sheet name in the workbook's order, chart sheets included (what `localSheetId` indexes). */
  sheetNames: string[];
  names: DefinedName[];
  sharedStrings: string[];
  /** True for a macro-enabled workbook (.xlsm): its copy must be one too. */
  macroEnabled: boolean;
  /** Dates counted from 1904-01-01 rather than 1899-12-30. */
  date1904: boolean;
}

/** A relationship part (`_rels/x.rels`): Id -> { type, target path inside the zip }. */
function relationships(xml: string, baseDir: string): Map<string, { type: string; target: string; external: boolean }> {
  const out = new Map<string, { type: string; target: string; external: boolean }>();
  for (const t of tags(xml)) {
    if (t.local !== 'Relationship' || t.closing) continue;
    const id = attribute(t.attrText, 'Id'), target = attribute(t.attrText, 'Target') ?? '';
    const external = attribute(t.attrText, 'TargetMode') === 'External';
    const resolved = target.startsWith('/') ? target.slice(1) : path.posix.normalize(path.posix.join(baseDir, target));
    if (id) out.set(id, { type: attribute(t.attrText, 'Type') ?? '', target: resolved, external });
  }
  return out;
}

/** The text of a part, or undefined when the zip has none by that name (names compared case-insensitively, as packages do). */
async function partText(zip: JSZip, name: string): Promise<string | undefined> {
  let file = zip.file(name);
  if (!file) {
    const lower = name.toLowerCase();
    const found = Object.keys(zip.files).find((k) => k.toLowerCase() === lower);
    file = found ? zip.file(found) : null;
  }
  // Bytes, decoded by Node (the zip library's own UTF-8 decoder is far slower on a big sheet).
  return file ? (nativeInflate(file) ?? (await file.async('nodebuffer'))).toString('utf8') : undefined;
}

/**
 * The zip library's internals used for speed (jszip 3: a part read from a zip keeps its stored
 * bytes in `_data`, a CompressedObject; one given as a CompressedObject is written as it is).
 */
interface StoredPart {
  compressedSize: number;
  uncompressedSize: number;
  crc32: number;
  compression: { magic: string };
  compressedContent: Uint8Array;
}
const DEFLATE_MAGIC = '\x08\x00';
type StoredPartClass = new (compressedSize: number, uncompressedSize: number, crc: number, compression: object, data: Uint8Array) => StoredPart;
// eslint-disable-next-line @typescript-eslint/no-require-imports
const StoredPartOf: StoredPartClass = require('jszip/lib/compressedObject');
// eslint-disable-next-line @typescript-eslint/no-require-imports
const DEFLATE: { magic: string } = require('jszip/lib/compressions').DEFLATE;

/**
 * A deflated part inflated by Node's zlib (native code; the zip library inflates in JavaScript,
 * in small steps between timer turns: several times slower on a big sheet). Undefined when the
 * part is not stored that way or does not inflate to its stated size: the zip library then reads
 * it (and says what is wrong).
 */
function nativeInflate(file: JSZip.JSZipObject): Buffer | undefined {
  const stored = (file as unknown as { _data?: StoredPart })._data;
  if (!(stored instanceof StoredPartOf) || stored.compression.magic !== DEFLATE_MAGIC) return undefined;
  try {
    const bytes = inflateRawSync(stored.compressedContent);
    return bytes.length === stored.uncompressedSize ? bytes : undefined;
  } catch {
    return undefined;
  }
}

/** A part's new bytes, deflated by Node's zlib and given to the zip library ready to be written. */
function deflatedPart(bytes: Buffer): StoredPart {
  const deflated = deflateRawSync(bytes, { level: 3 });
  return new StoredPartOf(deflated.length, bytes.length, crc32(bytes), DEFLATE, deflated);
}

function relsPath(part: string): string {
  return path.posix.join(path.posix.dirname(part), '_rels', `${path.posix.basename(part)}.rels`);
}

/** The `si` items of a shared-strings part as plain text. */
function parseSharedStrings(xml: string): string[] {
  const out: string[] = [];
  let open: Tag | undefined;
  let depth = 0;
  for (const t of tags(xml)) {
    if (t.local !== 'si') continue;
    if (t.selfClosing) { if (!open) out.push(''); continue; }
    if (!t.closing) { if (depth++ === 0) open = t; continue; }
    if (--depth === 0 && open) { out.push(runText(xml.slice(open.end, t.start))); open = undefined; }
  }
  return out;
}

/** 0-based row and column of a cell reference as files write it (`B12`), or of any other form parseA1 reads. */
function cellRef(r: string): { row: number; col: number } {
  let col = 0, i = 0;
  for (; i < r.length; i++) {
    const c = r.charCodeAt(i);
    if (c < 65 || c > 90) break;
    col = col * 26 + (c - 64);
  }
  let row = 0;
  const digits = i;
  for (; i < r.length; i++) {
    const c = r.charCodeAt(i);
    if (c < 48 || c > 57) break;
    row = row * 10 + (c - 48);
  }
  if (i < r.length || digits === 0 || digits > 3 || i === digits || i - digits > 7) return parseA1(r);
  return { row: row - 1, col: col - 1 };
}

/**
 * The cells of a worksheet part. Shared formulas are moved to each cell of their block. Read with a
 * TagCursor (offsets, no object per tag): a worksheet can hold a hundred thousand cells.
 */
export function parseSheet(name: string, partPath: string, xml: string): SheetPart {
  let sheetData: SheetPart['sheetData'] | undefined;
  let dimension: SheetPart['dimension'];
  const rows: FileRow[] = [];
  let prefix = '';
  const t = new TagCursor(xml);
  while (t.next()) {
    if (t.closing) continue;
    if (t.is('dimension')) dimension = { start: t.start, end: t.end, attrText: t.attrText };
    else if (t.is('sheetData')) {
      sheetData = { start: t.start, openEnd: t.end, end: t.end, selfClosing: t.selfClosing };
      prefix = xml.slice(t.nameStart, t.localStart);
      break;
    }
  }
  if (!sheetData) throw new Error(`the sheet part ${partPath} has no cell data`);
  const shared = new Map<string, { slide: (rows: number, cols: number) => string; row: number; col: number; group: number }>();
  let groups = 0;

  if (!sheetData.selfClosing) {
    let row: FileRow | undefined;
    let cell: FileCell | undefined;
    // The child element of the cell being read: its local name, where its start tag's attributes
    // lie and ends, and how deep elements of the same name nest in it (0: none open).
    let childLocal = '', childAttrStart = 0, childAttrEnd = 0, childOpenEnd = 0, depth = 0;
    let nextRow = 0, nextCol = 0;
    const child = (c: FileCell, local: string, attrStart: number, attrEnd: number, inner: string) => {
      if (local === 'v') c.value = unescapeXml(inner);
      else if (local === 'is') c.inline = runText(inner);
      else if (local === 'f') {
        const kind = attributeIn(xml, attrStart, attrEnd, 't') ?? 'normal';
        const ref = attributeIn(xml, attrStart, attrEnd, 'ref');
        const si = kind === 'shared' ? attributeIn(xml, attrStart, attrEnd, 'si') : undefined;
        let text = unescapeXml(inner);
        let group: number | undefined;
        if (si !== undefined) {
          if (text) shared.set(si, { slide: slider(text), row: c.row, col: c.col, group: (group = ++groups) });
          else {
            const master = shared.get(si);
            if (master) {
              text = master.slide(c.row - master.row, c.col - master.col);
              group = master.group;
            }
          }
          if (group !== undefined && text.includes('#REF!')) group = undefined;
        }
        c.formula = ref ? { text, kind, ref } : { text, kind };
        if (group !== undefined) c.formula.group = group;
      }
    };
    const local = () => (t.is('v') ? 'v' : t.is('f') ? 'f' : t.is('is') ? 'is' : t.local);
    while (t.next()) {
      if (cell) {
        if (depth > 0) {
          if (!t.selfClosing && t.nameEnd - t.localStart === childLocal.length && xml.startsWith(childLocal, t.localStart)) depth += t.closing ? -1 : 1;
          if (depth === 0) child(cell, childLocal, childAttrStart, childAttrEnd, xml.slice(childOpenEnd, t.start));
          continue;
        }
        if (t.closing && t.is('c')) {
          cell.end = t.end;
          row!.cells.push(cell);
          cell = undefined;
        } else if (!t.closing) {
          if (t.selfClosing) child(cell, local(), t.nameEnd, t.attrEnd, '');
          else {
            childLocal = local();
            childAttrStart = t.nameEnd;
            childAttrEnd = t.attrEnd;
            childOpenEnd = t.end;
            depth = 1;
          }
        }
        continue;
      }
      if (t.is('c')) {
        if (t.closing || !row) continue;
        const r = t.attr('r');
        const at = r !== undefined ? cellRef(r) : { row: row.row, col: nextCol };
        nextCol = at.col + 1;
        const c: FileCell = {
          row: row.row, col: at.col, start: t.start, end: t.end, tag: t.name, hasRef: r !== undefined,
          type: t.attr('t'), openEnd: t.end,
        };
        if (t.selfClosing) row.cells.push(c);
        else cell = c;
        continue;
      }
      if (t.is('row')) {
        if (t.closing) { if (row) row.end = t.end; row = undefined; continue; }
        const r = t.attr('r');
        const index = r !== undefined ? Number(r) - 1 : nextRow;
        nextRow = index + 1;
        nextCol = 0;
        row = { row: index, start: t.start, openEnd: t.end, end: t.end, selfClosing: t.selfClosing, tag: t.name, cells: [] };
        rows.push(row);
        if (t.selfClosing) row = undefined;
        continue;
      }
      if (t.closing && t.is('sheetData')) {
        sheetData.end = t.end;
        break;
      }
    }
  }
  return { name, path: partPath, xml, rows, prefix, sheetData, dimension };
}

/** Reads the package in `data`; `label` names it in messages. */
export async function readPackage(data: Buffer | Uint8Array, label: string): Promise<WorkbookPackage> {
  try {
    return await readParts(data, label);
  } catch (e) {
    if (e instanceof NotAWorkbookError) throw e;
    // A zip whose entries do not inflate, or parts that are not what their names say.
    throw new NotAWorkbookError(`${label}: not an .xlsx workbook, or damaged (${(e as Error).message})`);
  }
}

async function readParts(data: Buffer | Uint8Array, label: string): Promise<WorkbookPackage> {
  const fail = (why: string) => new NotAWorkbookError(`${label}: not an .xlsx workbook, or damaged (${why})`);
  // An OLE compound file: the older binary .xls format, or an .xlsx protected with a password.
  const ole = data.length >= 8 && [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1].every((b, i) => data[i] === b);
  if (ole) throw fail('this is an .xls file of the older binary format, or a workbook protected with a password: save it as an .xlsx without a password first');
  let zip: JSZip;
  try {
    zip = await JSZip.loadAsync(data);
  } catch {
    throw fail('not a zip package: cut short, or a file of another kind');
  }
  const rootRels = await partText(zip, '_rels/.rels');
  if (rootRels === undefined) throw fail('no _rels/.rels part');
  const main = [...relationships(rootRels, '').values()].find((r) => r.type.endsWith('/officeDocument'));
  if (!main) throw fail('no workbook part');
  const workbookXml = await partText(zip, main.target);
  if (workbookXml === undefined) throw fail(`no ${main.target} part`);
  const rootElement = tags(workbookXml).next().value;
  if (!rootElement || rootElement.local !== 'workbook') throw fail(`its main part ${main.target} is not a workbook (a document of another kind?)`);
  const rels = relationships((await partText(zip, relsPath(main.target))) ?? '', path.posix.dirname(main.target));

  const types = (await partText(zip, '[Content_Types].xml')) ?? '';
  let macroEnabled = false;
  for (const t of tags(types)) {
    if (t.local === 'Override' && attribute(t.attrText, 'PartName')?.replace(/^\//, '').toLowerCase() === main.target.toLowerCase()) {
      macroEnabled = /macroEnabled/i.test(attribute(t.attrText, 'ContentType') ?? '');
    }
  }
  if (!macroEnabled) macroEnabled = Object.keys(zip.files).some((k) => /vbaProject\.bin$/i.test(k));

  const sheetNames: string[] = [];
  const sheets: SheetPart[] = [];
  const names: DefinedName[] = [];
  let nameOpen: Tag | undefined;
  let date1904 = false;
  for (const t of tags(workbookXml)) {
    if (t.local === 'workbookPr' && !t.closing) {
      const d = attribute(t.attrText, 'date1904');
      date1904 = d === '1' || d === 'true';
    } else if (t.local === 'sheet' && !t.closing) {
      const name = attribute(t.attrText, 'name') ?? `Sheet${sheetNames.length + 1}`;
      sheetNames.push(name);
      const rel = rels.get(attribute(t.attrText, 'id') ?? '');
      if (!rel || rel.external || !rel.type.endsWith('/worksheet')) continue; // chart sheets, dialog sheets, macro sheets
      const xml = await partText(zip, rel.target);
      if (xml === undefined) throw fail(`the sheet "${name}" has no part ${rel.target}`);
      sheets.push(parseSheet(name, rel.target, xml));
    } else if (t.local === 'definedName') {
      if (!t.closing && !t.selfClosing) nameOpen = t;
      else if (t.closing && nameOpen) {
        const local = attribute(nameOpen.attrText, 'localSheetId');
        names.push({
          name: attribute(nameOpen.attrText, 'name') ?? '',
          text: unescapeXml(workbookXml.slice(nameOpen.end, t.start)),
          ...(local !== undefined ? { localSheet: Number(local) } : {}),
        });
        nameOpen = undefined;
      }
    }
  }
  const stringsRel = [...rels.values()].find((r) => r.type.endsWith('/sharedStrings'));
  const sharedStrings = stringsRel ? parseSharedStrings((await partText(zip, stringsRel.target)) ?? '') : [];
  return { zip, sheets, sheetNames, names, sharedStrings, macroEnabled, date1904 };
}

// ---------------------------------------------------------------------------------------------
// Writing

/** What a cell holds after the evaluation. */
export type FileValue =
  | { number: number }
  | { text: string }
  | { boolean: boolean }
  | { error: string }
  | { empty: true };

/** A change to one cell: its new value, and for a formula that now spills, the range it covers. */
export interface CellEdit {
  value: FileValue;
  /** For the anchor of a spilled result: the range to store on its array formula. */
  arrayRef?: string;
}

/** Per sheet name: row -> col -> edit (0-based). */
export type WorkbookEdits = Map<string, Map<number, Map<number, CellEdit>>>;

/** `t` attribute and child elements of a value; `formula`: the cell keeps a formula. */
function valueXml(v: FileValue, formula: boolean, p: string): { t?: string; xml: string } {
  if ('number' in v) {
    // Shortest text that reads back as the same double, with the capital E spreadsheet programs write.
    if (!Number.isFinite(v.number)) return { t: 'e', xml: `<${p}v>#NUM!</${p}v>` };
    return { xml: `<${p}v>${Object.is(v.number, -0) ? '0' : String(v.number).replace('e', 'E')}</${p}v>` };
  }
  if ('boolean' in v) return { t: 'b', xml: `<${p}v>${v.boolean ? 1 : 0}</${p}v>` };
  if ('error' in v) return { t: 'e', xml: `<${p}v>${encodeXstring(v.error)}</${p}v>` };
  if ('text' in v) {
    if (formula) return { t: 'str', xml: `<${p}v>${encodeXstring(v.text)}</${p}v>` };
    const space = /^\s|\s$/.test(v.text) ? ' xml:space="preserve"' : '';
    return { t: 'inlineStr', xml: `<${p}is><${p}t${space}>${encodeXstring(v.text)}</${p}t></${p}is>` };
  }
  return { xml: '' };
}

/** Sets (or, with undefined, removes) one attribute in a tag's raw attribute text; the others stay as written. */
const setAttrPatterns = new Map<string, RegExp>();
function setAttr(attrText: string, name: string, value: string | undefined): string {
  let re = setAttrPatterns.get(name);
  if (!re) setAttrPatterns.set(name, (re = new RegExp(`(\\s+)${name.replace(/[.:]/g, '\\$&')}\\s*=\\s*("[^"]*"|'[^']*')`)));
  if (value === undefined && !attrText.includes(name)) return attrText;
  if (value === undefined) return attrText.replace(re, '');
  if (re.test(attrText)) return attrText.replace(re, `$1${name}="${value}"`);
  const trailing = /\s*$/.exec(attrText)![0];
  return `${attrText.slice(0, attrText.length - trailing.length)} ${name}="${value}"${trailing}`;
}

/** The attribute text of a tag starting at `start` (between its name and `>` or `/>`). */
function tagAttrText(xml: string, start: number, end: number): { name: string; attrText: string } {
  const head = xml.slice(start, end);
  const name = /^<([\w.:-]+)/.exec(head)![1];
  const close = head.endsWith('/>') ? 2 : 1;
  return { name, attrText: head.slice(1 + name.length, head.length - close) };
}

/** A child element of a cell: its local name, offsets, and where its start tag's attributes lie. */
interface CellChild {
  local: string;
  start: number;
  end: number;
  /** End of the start tag. */
  openEnd: number;
  attrStart: number;
  attrEnd: number;
}

const childCursor = new TagCursor('');

/** The child elements of a cell (read again from the text: only the cells written anew need them). */
function cellChildren(xml: string, cell: FileCell): CellChild[] {
  const out: CellChild[] = [];
  if (cell.openEnd === cell.end) return out; // <c .../>
  const t = childCursor.at(xml, cell.openEnd);
  let open: CellChild | undefined;
  let depth = 0;
  while (t.next() && t.start < cell.end) {
    if (open) {
      if (!t.selfClosing && t.is(open.local)) depth += t.closing ? -1 : 1;
      if (depth === 0) {
        open.end = t.end;
        out.push(open);
        open = undefined;
      }
      continue;
    }
    if (t.closing) continue;
    const ch = { local: t.local, start: t.start, end: t.end, openEnd: t.end, attrStart: t.nameEnd, attrEnd: t.attrEnd };
    if (t.selfClosing) out.push(ch);
    else { open = ch; depth = 1; }
  }
  return out;
}

/** A cell element with its new value: a changed cell keeps its other attributes, formula and extensions. */
function cellXml(sheet: SheetPart, cell: FileCell | undefined, row: number, col: number, edit: CellEdit): string {
  const p = sheet.prefix;
  if (!cell) {
    const { t, xml } = valueXml(edit.value, false, p);
    return `<${p}c r="${a1(row, col)}"${t ? ` t="${t}"` : ''}${xml ? `>${xml}</${p}c>` : '/>'}`;
  }
  const xmlText = sheet.xml;
  const name = cell.tag;
  const selfClosing = cell.openEnd === cell.end && xmlText.charCodeAt(cell.end - 2) === 47; // '/>'
  const attrText = xmlText.slice(cell.start + 1 + name.length, cell.openEnd - (selfClosing ? 2 : 1));
  const children = cellChildren(xmlText, cell);
  const formula = children.some((ch) => ch.local === 'f');
  const cp = name.slice(0, name.length - 1); // the prefix of `c`: '' or 'x:'
  const { t, xml } = valueXml(edit.value, formula, cp);
  let attrs = setAttr(attrText, 't', t);
  if (!cell.hasRef) attrs = ` r="${a1(row, col)}"${attrs}`;
  let inner = '';
  let placed = false;
  for (const ch of children) {
    if (ch.local === 'v' || ch.local === 'is') continue;
    let raw = xmlText.slice(ch.start, ch.end);
    if (ch.local === 'f' && edit.arrayRef !== undefined) {
      const kind = attributeIn(xmlText, ch.attrStart, ch.attrEnd, 't');
      if (kind === undefined || kind === 'normal' || kind === 'array') {
        const fSelfClosing = ch.openEnd === ch.end && xmlText.charCodeAt(ch.end - 2) === 47;
        const fName = xmlText.slice(ch.start + 1, ch.attrStart);
        const fAttrs = setAttr(setAttr(xmlText.slice(ch.attrStart, ch.attrEnd), 't', 'array'), 'ref', edit.arrayRef);
        raw = `<${fName}${fAttrs}${fSelfClosing ? '/>' : '>'}${xmlText.slice(ch.openEnd, ch.end)}`;
      }
    }
    if (ch.local !== 'f' && !placed) { inner += xml; placed = true; }
    inner += raw;
    if (ch.local === 'f') { inner += xml; placed = true; }
  }
  if (!placed) inner += xml;
  return inner ? `<${name}${attrs}>${inner}</${name}>` : `<${name}${attrs}/>`;
}

/**
 * The cells of `cells` at the columns `cols` (ascending), when `cells` are in strictly ascending
 * column order and hold every one of them; undefined otherwise.
 */
function cellsInOrder(cells: FileCell[], cols: number[]): FileCell[] | undefined {
  for (let i = 1; i < cells.length; i++) if (cells[i].col <= cells[i - 1].col) return undefined;
  const found: FileCell[] = [];
  let k = 0;
  for (const c of cols) {
    while (k < cells.length && cells[k].col < c) k++;
    if (k === cells.length || cells[k].col !== c) return undefined;
    found.push(cells[k]);
  }
  return found;
}

/** The sheet part's text with `edits` applied; everything not edited is copied as it was. */
export function patchSheet(sheet: SheetPart, edits: Map<number, Map<number, CellEdit>>): string {
  const { xml, prefix: p } = sheet;
  const splices: Array<{ start: number; end: number; text: string }> = [];
  const rowsByIndex = new Map(sheet.rows.map((r) => [r.row, r]));
  let bounds = sheet.dimension ? dimensionBounds(attribute(sheet.dimension.attrText, 'ref')) : undefined;
  const grow = (row: number, col: number) => {
    if (!bounds) bounds = { top: row, left: col, bottom: row, right: col };
    else bounds = { top: Math.min(bounds.top, row), left: Math.min(bounds.left, col), bottom: Math.max(bounds.bottom, row), right: Math.max(bounds.right, col) };
  };
  const newRows: Array<{ at: number; text: string }> = [];
  const sortedRows = [...edits.keys()].sort((a, b) => a - b);
  let rowCursor = 0; // index into sheet.rows: rows before it have a smaller row number
  for (const r of sortedRows) {
    const colEdits = edits.get(r)!;
    const cols = [...colEdits.keys()].sort((a, b) => a - b);
    const existing = rowsByIndex.get(r);
    if (existing) {
      // Cells in column order, as files write them: each edited cell found by one walk along the row.
      const found = cellsInOrder(existing.cells, cols);
      if (found) {
        for (let i = 0; i < cols.length; i++) {
          splices.push({ start: found[i].start, end: found[i].end, text: cellXml(sheet, found[i], r, cols[i], colEdits.get(cols[i])!) });
        }
        continue;
      }
      const byCol = new Map(existing.cells.map((c) => [c.col, c]));
      if (cols.every((c) => byCol.has(c))) {
        for (const c of cols) {
          const cell = byCol.get(c)!;
          splices.push({ start: cell.start, end: cell.end, text: cellXml(sheet, cell, r, c, colEdits.get(c)!) });
        }
        continue;
      }
      // New cells in an existing row: the row is written again, its untouched cells as they were.
      const all = [...new Set([...existing.cells.map((c) => c.col), ...cols])].sort((a, b) => a - b);
      const parts = all.map((c) => {
        const cell = byCol.get(c);
        const edit = colEdits.get(c);
        if (edit) { grow(r, c); return cellXml(sheet, cell, r, c, edit); }
        const raw = xml.slice(cell!.start, cell!.end);
        return cell!.hasRef ? raw : raw.replace(/^<([\w.:-]+)/, `<$1 r="${a1(r, c)}"`);
      });
      const head = tagAttrText(xml, existing.start, existing.openEnd);
      let attrs = head.attrText;
      if (attribute(attrs, 'spans') !== undefined) attrs = setAttr(attrs, 'spans', `${all[0] + 1}:${all[all.length - 1] + 1}`);
      const body = existing.selfClosing ? '' : xml.slice(existing.openEnd, existing.end).replace(/<\/[\w.:-]+>$/, '');
      // Whatever the row holds besides cells (extensions) is kept after them.
      const rest = existing.cells.length ? body.slice(existing.cells[existing.cells.length - 1].end - existing.openEnd) : body;
      splices.push({ start: existing.start, end: existing.end, text: `<${head.name}${attrs}>${parts.join('')}${rest}</${head.name}>` });
      continue;
    }
    while (rowCursor < sheet.rows.length && sheet.rows[rowCursor].row < r) rowCursor++;
    const at = rowCursor > 0 ? sheet.rows[rowCursor - 1].end : sheet.sheetData.openEnd;
    const cells = cols.map((c) => { grow(r, c); return cellXml(sheet, undefined, r, c, colEdits.get(c)!); }).join('');
    const text = `<${p}row r="${r + 1}">${cells}</${p}row>`;
    if (sheet.sheetData.selfClosing) newRows.push({ at, text });
    else splices.push({ start: at, end: at, text });
  }
  if (sheet.sheetData.selfClosing && newRows.length) {
    const { name, attrText } = tagAttrText(xml, sheet.sheetData.start, sheet.sheetData.openEnd);
    splices.push({ start: sheet.sheetData.start, end: sheet.sheetData.end, text: `<${name}${attrText}>${newRows.map((n) => n.text).join('')}</${name}>` });
  }
  if (sheet.dimension && bounds) {
    const { name, attrText } = tagAttrText(xml, sheet.dimension.start, sheet.dimension.end);
    const ref = bounds.top === bounds.bottom && bounds.left === bounds.right
      ? a1(bounds.top, bounds.left)
      : `${a1(bounds.top, bounds.left)}:${a1(bounds.bottom, bounds.right)}`;
    if (ref !== attribute(attrText, 'ref')) splices.push({ start: sheet.dimension.start, end: sheet.dimension.end, text: `<${name}${setAttr(attrText, 'ref', ref)}/>` });
  }
  // By offset; at one offset, insertions (new rows, in row order) before the element that starts
  // there. They come in that order already but for the dimension (sorted here, stably).
  const before = (a: { start: number; end: number }, b: { start: number; end: number }) =>
    a.start - b.start || Number(a.end > a.start) - Number(b.end > b.start);
  let ordered = splices;
  if (!splices.every((s, i) => i === 0 || before(splices[i - 1], s) <= 0)) {
    ordered = splices.map((s, i) => ({ s, i })).sort((a, b) => before(a.s, b.s) || a.i - b.i).map((x) => x.s);
  }
  const out: string[] = [];
  let pos = 0;
  for (const s of ordered) {
    out.push(xml.slice(pos, s.start), s.text);
    pos = s.end;
  }
  out.push(xml.slice(pos));
  return out.join('');
}

function dimensionBounds(ref: string | undefined): { top: number; left: number; bottom: number; right: number } | undefined {
  try {
    return ref ? parseRange(ref) : undefined;
  } catch {
    return undefined;
  }
}

/** The package with every edited sheet patched, as the bytes of a zip; other parts are copied as they were. */
export async function writePackage(pkg: WorkbookPackage, edits: WorkbookEdits): Promise<Buffer> {
  for (const sheet of pkg.sheets) {
    const sheetEdits = edits.get(sheet.name);
    if (!sheetEdits || sheetEdits.size === 0) continue;
    // As bytes, deflated: Node's own UTF-8 encoder and zlib are far faster than the zip library's.
    pkg.zip.file(sheet.path, deflatedPart(Buffer.from(patchSheet(sheet, sheetEdits), 'utf8')) as never);
  }
  return pkg.zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE', compressionOptions: { level: 3 } });
}
