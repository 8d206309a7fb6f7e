/**
 * A whole workbook in the embedded engine: every worksheet of an .xlsx package (./xlsx-package)
 * becomes a sheet of a HyperFormula engine (values, formulas, defined names), the engine evaluates
 * every formula, and the results come back as edits of the package's cells: each formula cell gets
 * its computed value, and a spilled result fills the cells it covers.
 *
 * Wiring only: what a formula computes is the engine's business (and, for MIXGAP.* functions, the
 * cell functions'); this file moves cells between the two and reports what happened.
 */
import { readFileSync } from 'fs';
import { DetailedCellError } from 'hyperformula';
import type { ConfigParams, HyperFormula, RawCellContent, SerializedNamedExpression, Sheets, SimpleCellAddress } from 'hyperformula';
import { a1, a1Range, parseRange } from './a1';
import { NAMESPACE } from './engine';
import type { EngineContent } from './engine';
import { fallbackMessages, lowerExponents } from './evaluate';
import { readPackage } from './xlsx-package';
import type { CellEdit, FileCell, FileValue, WorkbookEdits, WorkbookPackage } from './xlsx-package';

// The address helpers live in ./a1; re-exported for the modules that import them from here.
export { a1, columnName, parseA1, parseRange, quoteSheet } from './a1';

/** One formula cell of the workbook. */
interface FormulaCell {
  sheet: string;
  sheetId: number;
  row: number; // 0-based
  col: number; // 0-based
  /** The formula as the file stores it (no leading "="). */
  text: string;
}

/** An error shown by a cell after the evaluation. */
export interface CellErrorReport {
  sheet: string;
  /** A1-style address, e.g. B12. */
  address: string;
  /** The engine's error code, e.g. #N/A, #NUM!, #SPILL!. */
  code: string;
  message: string;
  /** True for a cell filled by a spilled result rather than a formula cell of its own. */
  spilled: boolean;
}

/** What an evaluation did, for the summary. */
export interface WorkbookReport {
  sheets: string[];
  /** Formula cells evaluated. */
  formulas: number;
  /** Formulas whose result spilled over more than one cell. */
  spills: number;
  /** Cells filled by spilled results (anchors not counted). */
  spilledCells: number;
  /** Every cell (formula or spilled) that shows an error. */
  errors: CellErrorReport[];
  /** What the copy carries over as it was although it may show older numbers (charts' caches, ...). */
  notes: string[];
}

/**
 * What `calc` keeps byte for byte but cannot bring up to date: parts that hold their own copy of
 * cell values (charts, pivot caches), and what-if data tables, which the engine does not compute.
 */
function carriedNotes(book: WorkbookPackage): string[] {
  const parts = Object.keys(book.zip.files);
  const count = (re: RegExp) => parts.filter((p) => re.test(p)).length;
  const notes: string[] = [];
  const charts = count(/^xl\/charts\/chart[^/]*\.xml$/i);
  if (charts) notes.push(`${charts} chart${charts > 1 ? 's' : ''} carried over as ${charts > 1 ? 'they were' : 'it was'}: ${charts > 1 ? 'their' : 'its'} cached series show the input's numbers until the spreadsheet program refreshes them`);
  const pivots = count(/^xl\/pivotCache\/pivotCacheDefinition[^/]*\.xml$/i);
  if (pivots) notes.push(`${pivots} pivot cache${pivots > 1 ? 's' : ''} carried over as ${pivots > 1 ? 'they were' : 'it was'}: pivot tables show the input's numbers until refreshed`);
  let tables = 0;
  for (const sheet of book.sheets) for (const row of sheet.rows) for (const cell of row.cells) if (cell.formula?.kind === 'dataTable') tables++;
  if (tables) notes.push(`${tables} what-if data table formula${tables > 1 ? 's' : ''} not computed: ${tables > 1 ? 'their' : 'its'} cells keep their values`);
  return notes;
}

/** Called while formulas are evaluated: how many of how many are done. */
export type ProgressListener = (done: number, total: number) => void | Promise<void>;

/**
 * Error codes a file can carry in a cell. The engine has a few of its own (#SPILL!, #CYCLE!, #ERROR!
 * for a formula it cannot read, #LIC!); they are written as the classic code nearest in meaning,
 * and the report keeps the engine's code and message.
 */
const FILE_ERROR: Record<string, string> = {
  '#N/A': '#N/A',
  '#NUM!': '#NUM!',
  '#VALUE!': '#VALUE!',
  '#DIV/0!': '#DIV/0!',
  '#NAME?': '#NAME?',
  '#REF!': '#REF!',
  '#NULL!': '#NULL!',
  '#SPILL!': '#REF!',
  '#CYCLE!': '#REF!',
  '#ERROR!': '#NAME?',
  '#LIC!': '#VALUE!',
};

/** The value a file stores for an engine error code. */
export function fileError(code: string): { error: string } {
  return { error: FILE_ERROR[code] ?? '#VALUE!' };
}

/**
 * A formula as stored in a file -> the engine's text. Files written by recent spreadsheet programs
 * prefix newer functions (`_xlfn.SEQUENCE`, `_xlws.FILTER`) and unknown ones (`_xludf.NAME`), and
 * Excel saves add-in functions with `_xldudf_` (`_xldudf_MIXGAP_GAPLOW`, sometimes after a link
 * such as `[2]!`); the engine knows them as typed (`SEQUENCE`, `MIXGAP.GAPLOW`).
 */
export function engineFormula(text: string): string {
  let body = text.replace(/^\s*=/, '');
  // (tested first: most formulas have no prefix, and a workbook can hold a hundred thousand)
  if (/_xl/i.test(body)) body = body.replace(ADD_IN_PREFIX, `${NAMESPACE}.`).replace(/_xl(?:fn|ws|udf)\./gi, '');
  // (most formulas have no capital exponent either: tested before the rewrite, which reads every quote)
  return /\d\.?E/.test(body) ? lowerExponents(`=${body}`) : `=${body}`;
}
const ADD_IN_PREFIX = new RegExp(`(?:\\[\\d+\\]!)?_xldudf_${NAMESPACE}[._]`, 'gi');

/** Days since 1899-12-30 (or 1904-01-01): the number a spreadsheet stores for a date. */
function serialOf(iso: string, date1904: boolean): number | undefined {
  const time = Date.parse(/[zZ]|[+-]\d\d:\d\d$/.test(iso) ? iso : `${iso}Z`);
  if (Number.isNaN(time)) return undefined;
  const epoch = date1904 ? Date.UTC(1904, 0, 1) : Date.UTC(1899, 11, 30);
  return (time - epoch) / 86400000;
}

/** What the engine gets for a cell of the file that is not a formula (null: nothing). */
function rawContent(cell: FileCell, sharedStrings: string[], date1904: boolean): RawCellContent {
  const v = cell.value;
  // The leading apostrophe keeps text as text ("123", "=x" and "TRUE" stay strings).
  switch (cell.type) {
    case 's': {
      const text = sharedStrings[Number(v)];
      return text === undefined ? null : `'${text}`;
    }
    case 'inlineStr':
      return cell.inline !== undefined ? `'${cell.inline}` : v !== undefined ? `'${v}` : null;
    case 'str':
      return v === undefined ? null : `'${v}`;
    case 'b':
      return v === undefined ? null : v.trim() === '1' || v.trim().toLowerCase() === 'true';
    case 'e':
      return v === undefined ? null : v.trim(); // the engine reads "#N/A" as that error
    case 'd':
      return v === undefined ? null : serialOf(v.trim(), date1904) ?? `'${v}`;
    default: {
      if (v === undefined || v.trim() === '') return null;
      const n = Number(v);
      return Number.isFinite(n) ? n : `'${v}`;
    }
  }
}

/** The value a computed cell stores in the file. */
function fileValue(v: unknown): FileValue {
  if (v instanceof DetailedCellError) return fileError(v.value);
  if (typeof v === 'number') return { number: v };
  if (typeof v === 'string') return { text: v };
  if (typeof v === 'boolean') return { boolean: v };
  return { empty: true };
}

/** The cells a spilled result anchored at `anchor` covers: walk right and down over array cells without formulas. */
function spillExtent(engine: HyperFormula, anchor: SimpleCellAddress): { rows: number; cols: number } {
  const inSpill = (row: number, col: number) => {
    const a = { sheet: anchor.sheet, row, col };
    return engine.isCellPartOfArray(a) && engine.getCellFormula(a) === undefined;
  };
  let cols = 1, rows = 1;
  while (inSpill(anchor.row, anchor.col + cols)) cols++;
  while (inSpill(anchor.row + rows, anchor.col)) rows++;
  return { rows, cols };
}

/**
 * Why a spilled result has no room, naming the cells in the way: the engine reports only "no space",
 * so the result is computed again in the sheet's context (not placed) to learn its size, and the
 * cells it would cover are searched for values or formulas. Undefined when that cannot be told.
 */
export function spillBlockers(engine: HyperFormula, anchor: SimpleCellAddress): string | undefined {
  const formula = engine.getCellFormula(anchor);
  if (!formula) return undefined;
  let result: unknown;
  try {
    result = engine.calculateFormula(formula, anchor.sheet);
  } catch {
    return undefined;
  }
  if (!Array.isArray(result) || result.length === 0) return undefined;
  const rows = result.length, cols = Math.max(...(result as unknown[][]).map((r) => r.length));
  const blockers: string[] = [];
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      if (i === 0 && j === 0) continue;
      const at = { sheet: anchor.sheet, row: anchor.row + i, col: anchor.col + j };
      if (!engine.isCellEmpty(at)) blockers.push(a1(at.row, at.col));
    }
  }
  if (blockers.length === 0) return undefined;
  const range = a1Range(anchor.row, anchor.col, anchor.row + rows - 1, anchor.col + cols - 1);
  const listed = blockers.length > 3 ? `${blockers.slice(0, 3).join(', ')} and ${blockers.length - 3} more cells are` : blockers.length > 1 ? `${blockers.join(', ')} are` : `${blockers[0]} is`;
  return `no room for the spilled result (${range}): ${listed} not empty; clear ${blockers.length > 1 ? 'them' : 'it'} or move the formula`;
}

/** Reads the workbook package at `file` (.xlsx or .xlsm). */
export async function readWorkbook(file: string): Promise<WorkbookPackage> {
  return readPackage(readFileSync(file), file);
}

/** What an evaluation gives: the summary, the cells of the package to change, and the engine. */
export interface Evaluation {
  report: WorkbookReport;
  edits: WorkbookEdits;
  /** The engine with the workbook loaded and evaluated (the caller destroys it). */
  engine: HyperFormula;
}

/** Builds an engine from whole sheets and names at once (buildMixgapEngine with WORKBOOK_ENGINE_CONFIG). */
export type WorkbookEngineFactory = (content: EngineContent) => HyperFormula;

/**
 * Evaluates every formula of `book` in an engine built by `build` from the whole workbook at once
 * (sheets and names in one go: the engine's bulk path, with no undo history and one evaluation),
 * and returns the summary and the edits that store the results:
 *   - a formula cell keeps its formula and gets its computed value;
 *   - a spilled result fills the cells it covers with plain values; its anchor keeps the formula,
 *     stored as an array formula over the covered range so spreadsheet programs show the whole table;
 *   - an error is stored as an error value.
 * The cells an array formula of the input covered (cached values of an earlier run or of a
 * spreadsheet program) are left out of the engine, so they never block the new result, and are
 * emptied in the copy when no result fills them any more.
 */
export async function evaluateWorkbook(
  book: WorkbookPackage,
  build: WorkbookEngineFactory,
  onProgress?: ProgressListener,
): Promise<Evaluation> {
  const sheets = book.sheets.map((s) => s.name);
  const formulas: FormulaCell[] = [];
  /** Per sheet: cells of array ranges of the input (other than their anchors), as row * 16384 + col. */
  const arrayCells = new Map<string, Set<number>>();
  const key = (row: number, col: number) => row * 16384 + col;

  const content: Sheets = {};
  /** Per sheet: the cells of shared formulas (row * 16384 + col) and the block each belongs to. */
  const groups = new Map<string, Map<number, number>>();
  book.sheets.forEach((sheet) => {
    const sheetGroups = new Map<number, number>();
    groups.set(sheet.name, sheetGroups);
    const covered = new Set<number>();
    for (const row of sheet.rows) {
      for (const cell of row.cells) {
        const f = cell.formula;
        if (f?.kind !== 'array' || !f.ref) continue;
        let r;
        try { r = parseRange(f.ref); } catch { continue; }
        for (let i = r.top; i <= r.bottom; i++) {
          for (let j = r.left; j <= r.right; j++) if (i !== cell.row || j !== cell.col) covered.add(key(i, j));
        }
      }
    }
    arrayCells.set(sheet.name, covered);
    const grid: RawCellContent[][] = [];
    for (const row of sheet.rows) {
      for (const cell of row.cells) {
        if (covered.has(key(cell.row, cell.col))) continue;
        const f = cell.formula;
        let value: RawCellContent;
        if (f && f.text && f.kind !== 'dataTable') {
          formulas.push({ sheet: sheet.name, sheetId: -1, row: cell.row, col: cell.col, text: f.text });
          value = engineFormula(f.text);
          if (f.group !== undefined) sheetGroups.set(key(cell.row, cell.col), f.group);
        } else {
          value = rawContent(cell, book.sharedStrings, book.date1904);
          if (value === null) continue;
        }
        (grid[cell.row] ??= [])[cell.col] = value;
      }
    }
    // The engine wants whole rows: no holes (empty rows and cells are null).
    for (let r = 0; r < grid.length; r++) {
      const row = (grid[r] ??= []);
      for (let c = 0; c < row.length; c++) if (row[c] === undefined) row[c] = null;
    }
    content[sheet.name] = grid;
  });

  // Defined names that stand for a cell, a range or a formula (print areas and the like excluded).
  // The engine numbers sheets in the order of the object's keys (where a name such as "2024" comes
  // first): scopes follow that order, and sheet ids are asked of the engine once it is built.
  const order = Object.keys(content);
  const names: SerializedNamedExpression[] = [];
  for (const { name, text, localSheet } of book.names) {
    if (!name || name.startsWith('_xl') || !text) continue;
    const sheetName = localSheet !== undefined ? book.sheetNames[localSheet] : undefined;
    const scope = sheetName !== undefined ? order.indexOf(sheetName) : undefined;
    if (localSheet !== undefined && (scope === undefined || scope < 0)) continue;
    names.push({ name, expression: engineFormula(text), ...(scope !== undefined ? { scope } : {}) });
  }

  // The engine reads the cells of a shared formula once per block. It numbers sheets in the order
  // of `order`; a text that is not the one given for the cell (should that order ever differ) is
  // read as usual.
  const bySheetId = order.map((name) => ({ grid: content[name], groups: groups.get(name)! }));
  const formulaGroups = (address: SimpleCellAddress, text: string): number | undefined => {
    const sheet = bySheetId[address.sheet];
    const group = sheet?.groups.get(key(address.row, address.col));
    if (group === undefined || sheet.grid[address.row]?.[address.col] !== text) return undefined;
    return address.sheet * 2 ** 32 + group;
  };

  await onProgress?.(0, formulas.length);
  let engine: HyperFormula;
  try {
    engine = build({ sheets: content, names, formulaGroups });
  } catch {
    // A name the engine does not accept (it refuses the whole list): load without names, then
    // add the ones it takes, one by one.
    engine = build({ sheets: content, formulaGroups });
    engine.batch(() => {
      for (const n of names) {
        if (engine.isItPossibleToAddNamedExpression(n.name, n.expression, n.scope)) engine.addNamedExpression(n.name, n.expression, n.scope);
      }
    });
  }
  await onProgress?.(formulas.length, formulas.length);
  for (const f of formulas) f.sheetId = engine.getSheetId(f.sheet)!;

  // Results, as edits of the package's cells.
  const report: WorkbookReport = { sheets, formulas: formulas.length, spills: 0, spilledCells: 0, errors: [], notes: carriedNotes(book) };
  const edits: WorkbookEdits = new Map(sheets.map((s) => [s, new Map<number, Map<number, CellEdit>>()]));
  const setEdit = (sheet: string, row: number, col: number, edit: CellEdit) => {
    const rows = edits.get(sheet)!;
    let cols = rows.get(row);
    if (!cols) rows.set(row, (cols = new Map()));
    cols.set(col, edit);
  };
  const filled = new Map<string, Set<number>>(sheets.map((s) => [s, new Set<number>()]));
  const noteError = (sheet: string, row: number, col: number, v: unknown, spilled: boolean) => {
    if (v instanceof DetailedCellError) {
      report.errors.push({ sheet, address: a1(row, col), code: v.value, message: v.message || fallbackMessages[v.value] || '', spilled });
    }
  };
  for (const f of formulas) {
    const anchor = { sheet: f.sheetId, row: f.row, col: f.col };
    const value = engine.getCellValue(anchor);
    if (value instanceof DetailedCellError && value.value === '#SPILL!') {
      const why = spillBlockers(engine, anchor);
      if (why) report.errors.push({ sheet: f.sheet, address: a1(f.row, f.col), code: value.value, message: why, spilled: false });
      else noteError(f.sheet, f.row, f.col, value, false);
    } else {
      noteError(f.sheet, f.row, f.col, value, false);
    }
    const extent = engine.isCellPartOfArray(anchor) ? spillExtent(engine, anchor) : { rows: 1, cols: 1 };
    if (extent.rows === 1 && extent.cols === 1) {
      setEdit(f.sheet, f.row, f.col, { value: fileValue(value) });
      continue;
    }
    report.spills++;
    setEdit(f.sheet, f.row, f.col, {
      value: fileValue(value),
      arrayRef: a1Range(f.row, f.col, f.row + extent.rows - 1, f.col + extent.cols - 1),
    });
    for (let i = 0; i < extent.rows; i++) {
      for (let j = 0; j < extent.cols; j++) {
        if (i === 0 && j === 0) continue;
        const r = f.row + i, c = f.col + j;
        const v = engine.getCellValue({ sheet: f.sheetId, row: r, col: c });
        noteError(f.sheet, r, c, v, true);
        setEdit(f.sheet, r, c, { value: fileValue(v) });
        filled.get(f.sheet)!.add(key(r, c));
        report.spilledCells++;
      }
    }
  }
  // Cached values of the input's array ranges that no result covers any more are emptied
  // (cells that do not exist in the file need nothing).
  for (const sheet of book.sheets) {
    const covered = arrayCells.get(sheet.name)!;
    if (covered.size === 0) continue;
    for (const row of sheet.rows) {
      for (const cell of row.cells) {
        const k = key(cell.row, cell.col);
        if (covered.has(k) && !filled.get(sheet.name)!.has(k)) setEdit(sheet.name, cell.row, cell.col, { value: { empty: true } });
      }
    }
  }
  return { report, edits, engine };
}

/**
 * Engine settings a workbook needs: room for as many rows and columns as a spreadsheet has, and no
 * undo history (a workbook is loaded once and never undone; keeping every change for undo made
 * loading a big workbook slower than evaluating it, by far).
 */
export const WORKBOOK_ENGINE_CONFIG: Partial<ConfigParams> = { maxRows: 1048576, maxColumns: 16384, undoLimit: 0 };
