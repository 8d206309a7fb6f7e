/**
 * Evaluates formula texts, each as if typed into a cell of its own, and reads back what the cell
 * shows: a value, an error with its message, or the whole range of a spilled result.
 */
import { DetailedCellError } from 'hyperformula';
import type { CellValue, HyperFormula } from 'hyperformula';
import { NAMESPACE } from './engine';
import { calledNames, readSemicolons } from './formula-text';
import type { SemicolonReading } from './formula-text';

/** An error as the command reports it: the spreadsheet code and what to fix. */
export interface ErrorCell {
  error: string;
  message: string;
}

/** One cell of a result. */
export type ResultCell = number | string | boolean | null | ErrorCell;

/** What one formula gives: a single cell, or the rows of a spilled result. */
export type FormulaResult = ResultCell | ResultCell[][];

/** What an error means, for errors the engine reports without a message of their own. */
export const fallbackMessages: Record<string, string> = {
  '#DIV/0!': 'division by zero',
  '#NAME?': 'unknown function or name',
  '#VALUE!': 'wrong kind of value',
  '#NUM!': 'number out of range',
  '#N/A': 'value not available',
  '#REF!': 'invalid reference',
  '#CYCLE!': 'circular reference',
  '#SPILL!': 'no room for the spilled result',
  '#ERROR!': 'the formula could not be parsed',
};

function toResultCell(v: CellValue): ResultCell {
  if (v instanceof DetailedCellError) {
    return { error: v.value, message: v.message || fallbackMessages[v.value] || 'error' };
  }
  return v;
}

/** A formula text as typed; a text without the leading `=` is taken as a formula all the same. */
export function asFormula(text: string): string {
  const t = text.trim();
  return lowerExponents(t.startsWith('=') ? t : `=${t}`);
}

/**
 * `1E+12` -> `1e+12`: spreadsheets write exponents with a capital E, which the engine's parser
 * does not read. Text inside "strings" and 'quoted sheet names' is left alone; elsewhere the
 * change cannot alter meaning (names and functions are not case-sensitive).
 */
export function lowerExponents(formula: string): string {
  return formula.replace(/("(?:[^"]|"")*"|'(?:[^']|'')*')|(\d\.?)E(?=[+-]?\d)/g, (_match, quoted, digits) => quoted ?? `${digits}e`);
}

/**
 * Puts each formula in cell A1 of a sheet of its own (so spilled results never collide) and returns
 * the value of each: the cell's value, or the rows of its spill range.
 */
export function evaluateFormulas(engine: HyperFormula, formulas: string[]): FormulaResult[] {
  // `;` between arguments is read as `,` where that is unambiguous (./formula-text).
  const readings = formulas.map((formula) => readSemicolons(asFormula(formula)));
  const sheets: number[] = [];
  engine.batch(() => {
    readings.forEach(({ formula }) => {
      const sheet = engine.getSheetId(engine.addSheet())!; // a fresh, uniquely named sheet
      sheets.push(sheet);
      engine.setCellContents({ sheet, row: 0, col: 0 }, [[formula]]);
    });
  });
  return sheets.map((sheet, i) => {
    const anchor = { sheet, row: 0, col: 0 };
    if (!engine.isCellPartOfArray(anchor)) return explained(engine, readings[i], toResultCell(engine.getCellValue(anchor)));
    return engine.getSheetValues(sheet).map((row) => row.map(toResultCell));
  });
}

/**
 * An error of the whole formula with what to do about it, where the engine's own message does not
 * say: `;` between arguments that could not be read (#ERROR!), a Mixgap function called without
 * its namespace (#NAME?).
 */
function explained(engine: HyperFormula, reading: SemicolonReading, cell: ResultCell): ResultCell {
  if (cell === null || typeof cell !== 'object') return cell;
  if (cell.error === '#ERROR!' && reading.hint) return { error: cell.error, message: reading.hint };
  if (cell.error === '#NAME?') {
    const registered = new Set(engine.getRegisteredFunctionNames().map((n) => n.toUpperCase()));
    const ours = calledNames(reading.formula).filter((name) => !registered.has(name) && registered.has(`${NAMESPACE}.${name}`));
    if (ours.length > 0) {
      const fix = ours.map((name) => `${NAMESPACE}.${name}(...)`).join(', ');
      return { error: cell.error, message: `${ours.join(', ')}: Mixgap's functions are called with the ${NAMESPACE}. namespace, as in Excel: write ${fix}` };
    }
  }
  return cell;
}
