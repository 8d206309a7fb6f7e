/**
 * A whole .xlsx workbook in the embedded engine: every sheet of an ExcelJS workbook becomes a sheet
 * of a HyperFormula engine (values, formulas, defined names), the engine evaluates every formula,
 * and the results go back into the ExcelJS workbook as cached values beside the formulas.
 *
 * Wiring only: what a formula computes is the engine's business (and, for MIXGAP.* functions, the
 * cell functions'); this file moves cells between the two and reports what happened.
 */
import ExcelJS from 'exceljs';
import { DetailedCellError } from 'hyperformula';
import type { HyperFormula, RawCellContent, SimpleCellAddress } from 'hyperformula';
import { NAMESPACE } from './engine';
import { fallbackMessages, lowerExponents } from './evaluate';

/** One formula cell of the workbook. */
interface FormulaCell {
  sheet: string;
  sheetId: number;
  row: number; // 0-based
  col: number; // 0-based
  /** The formula as the file stores it (no leading "="), written back unchanged. */
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

/** The error value ExcelJS writes for an engine error code. */
export function fileError(code: string): ExcelJS.CellErrorValue {
  return { error: (FILE_ERROR[code] ?? '#VALUE!') as ExcelJS.CellErrorValue['error'] };
}

/** Column letters of a 0-based column index (0 -> A, 26 -> AA). */
export function columnName(col: number): string {
  let s = '';
  for (let n = col + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

/** A1-style address of 0-based row and column. */
export function a1(row: number, col: number): string {
  return `${columnName(col)}${row + 1}`;
}

/** 0-based row and column of an A1-style address ($ allowed). */
export function parseA1(address: string): { row: number; col: number } {
  const m = /^\$?([A-Za-z]{1,3})\$?(\d+)$/.exec(address.trim());
  if (!m) throw new Error(`"${address}" is not a cell address such as B12`);
  let col = 0;
  for (const ch of m[1].toUpperCase()) col = col * 26 + (ch.charCodeAt(0) - 64);
  return { row: Number(m[2]) - 1, col: col - 1 };
}

/** Rows and columns of an A1-style range such as A1:B6 (a single cell is a 1x1 range). */
export function parseRange(range: string): { top: number; left: number; bottom: number; right: number } {
  const [from, to = from] = range.split(':');
  const a = parseA1(from), b = parseA1(to);
  return { top: Math.min(a.row, b.row), left: Math.min(a.col, b.col), bottom: Math.max(a.row, b.row), right: Math.max(a.col, b.col) };
}

/** A sheet name as a formula writes it: quoted unless it is a plain identifier. */
export function quoteSheet(name: string): string {
  return /^[A-Za-z_][A-Za-z0-9_.]*$/.test(name) ? name : `'${name.replace(/'/g, "''")}'`;
}

/**
 * A formula as stored in a file -> the engine's text. Files written by recent spreadsheet programs
 * prefix newer functions (`_xlfn.SEQUENCE`, `_xlws.FILTER`) and unknown ones (`_xludf.NAME`), and
 * Excel saves add-in functions with `_xldudf_` (`_xldudf_MIXGAP_GAPLOW`, sometimes after a link
 * such as `[2]!`); the engine knows them as typed (`SEQUENCE`, `MIXGAP.GAPLOW`).
 */
export function engineFormula(text: string): string {
  const body = text.replace(/^\s*=/, '')
    .replace(new RegExp(`(?:\\[\\d+\\]!)?_xldudf_${NAMESPACE}[._]`, 'gi'), `${NAMESPACE}.`)
    .replace(/_xl(?:fn|ws|udf)\./gi, '');
  return lowerExponents(`=${body}`);
}

/** Days since 1899-12-30 (or 1904-01-01): the number a spreadsheet stores for a date. */
function serialOf(date: Date, date1904: boolean): number {
  const epoch = date1904 ? Date.UTC(1904, 0, 1) : Date.UTC(1899, 11, 30);
  return (date.getTime() - epoch) / 86400000;
}

/** What the engine gets for a cell that is not a formula. */
function rawContent(cell: ExcelJS.Cell, date1904: boolean): RawCellContent {
  const v = cell.value;
  switch (cell.type) {
    case ExcelJS.ValueType.Number:
      return v as number;
    case ExcelJS.ValueType.Boolean:
      return v as boolean;
    case ExcelJS.ValueType.Date:
      return serialOf(v as Date, date1904);
    case ExcelJS.ValueType.Error:
      return (v as ExcelJS.CellErrorValue).error; // the engine reads "#N/A" as that error
    case ExcelJS.ValueType.String:
    case ExcelJS.ValueType.RichText:
    case ExcelJS.ValueType.Hyperlink:
    case ExcelJS.ValueType.SharedString:
      // The leading apostrophe keeps text as text ("123", "=x" and "TRUE" stay strings).
      return `'${cell.text}`;
    default:
      return null;
  }
}

/** The value a formula's result cell carries in the file. */
function fileValue(v: unknown): ExcelJS.CellValue {
  if (v instanceof DetailedCellError) return fileError(v.value);
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
  return null;
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

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Evaluates every formula of `wb` with `engine` (a fresh engine from buildMixgapEngine, with
 * room for the workbook's rows and columns) and stores each result in `wb`:
 *   - a formula cell keeps its formula and gets its computed value;
 *   - a spilled result fills the cells it covers with plain values; its anchor keeps the formula,
 *     written as an array formula over the covered range so spreadsheet programs show the whole table;
 *   - an error is stored as an error value.
 * The cells an array formula of the input covered (cached values of an earlier run or of a
 * spreadsheet program) are emptied first, so they never block the new result.
 */
export async function evaluateWorkbook(
  wb: ExcelJS.Workbook,
  engine: HyperFormula,
  onProgress?: ProgressListener,
): Promise<WorkbookReport> {
  const date1904 = !!wb.properties?.date1904;
  const sheets = wb.worksheets.map((ws) => ws.name);
  const formulas: FormulaCell[] = [];
  /** Per sheet: cells of array ranges of the input (other than their anchors), as "row,col". */
  const arrayCells = new Map<string, Set<string>>();

  // Sheets and plain values first, in one batch: nothing is evaluated yet.
  engine.batch(() => {
    for (const ws of wb.worksheets) engine.addSheet(ws.name);
    for (const ws of wb.worksheets) {
      const sheetId = engine.getSheetId(ws.name)!;
      const covered = new Set<string>();
      ws.eachRow({ includeEmpty: false }, (row) => {
        row.eachCell({ includeEmpty: false }, (cell) => {
          if (cell.type !== ExcelJS.ValueType.Formula) return;
          const model = cell.model as { shareType?: string; ref?: string };
          if (model.shareType !== 'array' || !model.ref) return;
          const r = parseRange(model.ref);
          for (let i = r.top; i <= r.bottom; i++) {
            for (let j = r.left; j <= r.right; j++) if (i !== Number(row.number) - 1 || j !== Number(cell.col) - 1) covered.add(`${i},${j}`);
          }
        });
      });
      arrayCells.set(ws.name, covered);
      ws.eachRow({ includeEmpty: false }, (row) => {
        row.eachCell({ includeEmpty: false }, (cell) => {
          const r = Number(row.number) - 1, c = Number(cell.col) - 1;
          if (cell.type === ExcelJS.ValueType.Merge || covered.has(`${r},${c}`)) return;
          if (cell.type === ExcelJS.ValueType.Formula) {
            const text = cell.formula;
            if (text) formulas.push({ sheet: ws.name, sheetId, row: r, col: c, text });
            return;
          }
          const content = rawContent(cell, date1904);
          if (content !== null) engine.setCellContents({ sheet: sheetId, row: r, col: c }, [[content]]);
        });
      });
    }
    // Workbook-level names that stand for one cell or range (print areas and the like excluded).
    for (const { name, ranges } of (wb.definedNames as unknown as { model: Array<{ name: string; ranges: string[]; localSheetId?: number }> }).model) {
      if (ranges.length !== 1 || name.startsWith('_xlnm') || name.startsWith('_xl')) continue;
      if (engine.isItPossibleToAddNamedExpression(name, `=${ranges[0]}`)) engine.addNamedExpression(name, `=${ranges[0]}`);
    }
  });

  // Formulas in chunks, each chunk one batch, so progress can be shown. A formula whose inputs come
  // in a later chunk is evaluated again then: the engine keeps every result consistent.
  const chunk = Math.max(1, Math.ceil(formulas.length / 100));
  for (let i = 0; i < formulas.length; i += chunk) {
    engine.batch(() => {
      for (const f of formulas.slice(i, i + chunk)) {
        engine.setCellContents({ sheet: f.sheetId, row: f.row, col: f.col }, [[engineFormula(f.text)]]);
      }
    });
    await onProgress?.(Math.min(i + chunk, formulas.length), formulas.length);
    await yieldToEventLoop();
  }

  // Results back into the workbook.
  const report: WorkbookReport = { sheets, formulas: formulas.length, spills: 0, spilledCells: 0, errors: [] };
  const filled = new Map<string, Set<string>>(sheets.map((s) => [s, new Set<string>()]));
  const noteError = (sheet: string, row: number, col: number, v: unknown, spilled: boolean) => {
    if (v instanceof DetailedCellError) {
      report.errors.push({ sheet, address: a1(row, col), code: v.value, message: v.message || fallbackMessages[v.value] || '', spilled });
    }
  };
  for (const f of formulas) {
    const ws = wb.getWorksheet(f.sheet)!;
    const anchor = { sheet: f.sheetId, row: f.row, col: f.col };
    const value = engine.getCellValue(anchor);
    noteError(f.sheet, f.row, f.col, value, false);
    const extent = engine.isCellPartOfArray(anchor) ? spillExtent(engine, anchor) : { rows: 1, cols: 1 };
    const result = fileValue(value);
    const cell = ws.getCell(f.row + 1, f.col + 1);
    if (extent.rows === 1 && extent.cols === 1) {
      cell.value = { formula: f.text, result } as ExcelJS.CellFormulaValue;
      continue;
    }
    report.spills++;
    const ref = `${a1(f.row, f.col)}:${a1(f.row + extent.rows - 1, f.col + extent.cols - 1)}`;
    cell.value = { formula: f.text, result, shareType: 'array', ref } as unknown as ExcelJS.CellFormulaValue;
    for (let i = 0; i < extent.rows; i++) {
      for (let j = 0; j < extent.cols; j++) {
        if (i === 0 && j === 0) continue;
        const r = f.row + i, c = f.col + j;
        const v = engine.getCellValue({ sheet: f.sheetId, row: r, col: c });
        noteError(f.sheet, r, c, v, true);
        ws.getCell(r + 1, c + 1).value = fileValue(v);
        filled.get(f.sheet)!.add(`${r},${c}`);
        report.spilledCells++;
      }
    }
  }
  // Cached values of the input's array ranges that no result covers any more are emptied.
  for (const [sheet, covered] of arrayCells) {
    const ws = wb.getWorksheet(sheet)!;
    for (const key of covered) {
      if (filled.get(sheet)!.has(key)) continue;
      const [r, c] = key.split(',').map(Number);
      ws.getCell(r + 1, c + 1).value = null;
    }
  }
  return report;
}

/** Engine settings a workbook needs: room for as many rows and columns as a spreadsheet has. */
export const WORKBOOK_ENGINE_CONFIG = { maxRows: 1048576, maxColumns: 16384 };
