/**
 * Where `mixgap diagram` finds a parameter card: a CSV file of key,value rows, or a range of an
 * .xlsx workbook (evaluated first with the embedded engine, so a card may hold formulas).
 * Also reads the compositions to mark, each a formula evaluated in the same engine.
 */
import { readFileSync } from 'fs';
import { parse } from 'csv-parse/sync';
import { DetailedCellError } from 'hyperformula';
import type { HyperFormula } from 'hyperformula';
import { numberText } from '../functions/cells';
import type { CardGrid } from './diagram';
import type { CustomFunctionsMetadata } from './engine';
import { evaluateFormulas } from './evaluate';
import { buildMixgapEngine } from './mixgap-engine';
import { a1, evaluateWorkbook, parseRange, readWorkbook, WORKBOOK_ENGINE_CONFIG } from './workbook';

/** A CSV cell: a number when it reads as one, otherwise the text; an empty cell is null. */
function csvValue(text: string): string | number | null {
  const t = text.trim();
  if (t === '') return null;
  return numberText(t) ?? t;
}

/**
 * A card saved with semicolons between its cells (what a spreadsheet set to a language with
 * decimal commas writes as CSV): the first cell of every row holds a ';'. Such a file is refused
 * with what to do, rather than guessed at (its numbers may carry decimal commas).
 */
function refuseSemicolons(records: string[][]): void {
  const rows = records.filter((r) => r.some((c) => c.trim() !== ''));
  if (rows.length > 0 && rows.every((r) => r[0].includes(';'))) {
    throw new Error(
      'the card file separates its cells with ";", not ",": save it as CSV with commas (key,value on each line, ' +
        'a point as decimal separator: 21.5, not 21,5), or give the workbook with --range',
    );
  }
}

/**
 * Reads a card from CSV text: one key,value row per line; blank lines and lines starting with #
 * are skipped, and so is a first row reading key,value.
 */
export function parseCardCsv(text: string): CardGrid {
  const records = parse(text, { skip_empty_lines: true, relax_column_count: true, comment: '#', bom: true }) as string[][];
  refuseSemicolons(records);
  const rows = records.map((r) => r.map(csvValue)).filter((r) => r.some((v) => v !== null));
  if (rows.length > 0 && String(rows[0][0]).toLowerCase() === 'key' && String(rows[0][1]).toLowerCase() === 'value') rows.shift();
  if (rows.length === 0) throw new Error('the card file has no key,value rows');
  return rows.map((r) => r.slice(0, Math.max(2, r.length)));
}

/** A card and the engine its marks are evaluated in. */
export interface CardSource {
  grid: CardGrid;
  engine: HyperFormula;
  /** Where the card came from, for messages. */
  where: string;
}

export function cardFromCsv(file: string, metadata: CustomFunctionsMetadata): CardSource {
  return { grid: parseCardCsv(readFileSync(file, 'utf8')), engine: buildMixgapEngine(metadata), where: file };
}

/**
 * Reads a card from a range of a workbook, after evaluating the whole workbook. `range` is A1:B8
 * or Sheet!A1:B8; `sheet` (default: the first sheet) applies when the range names none.
 */
export async function cardFromXlsx(file: string, metadata: CustomFunctionsMetadata, range: string, sheet?: string): Promise<CardSource> {
  const wb = await readWorkbook(file);
  const bang = range.lastIndexOf('!');
  let sheetName = bang >= 0 ? range.slice(0, bang).replace(/^'(.*)'$/, '$1').replace(/''/g, "'") : sheet ?? wb.sheets[0]?.name;
  const cells = bang >= 0 ? range.slice(bang + 1) : range;
  const ws = wb.sheets.find((w) => w.name.toLowerCase() === String(sheetName).toLowerCase());
  if (!ws) throw new Error(`${file} has no sheet "${sheetName}" (sheets: ${wb.sheets.map((w) => w.name).join(', ')})`);
  sheetName = ws.name;
  const { engine } = await evaluateWorkbook(wb, (content) => buildMixgapEngine(metadata, WORKBOOK_ENGINE_CONFIG, content));
  const r = parseRange(cells);
  const sheetId = engine.getSheetId(sheetName)!;
  const grid: CardGrid = [];
  for (let i = r.top; i <= r.bottom; i++) {
    const row: CardGrid[number] = [];
    for (let j = r.left; j <= r.right; j++) {
      const v = engine.getCellValue({ sheet: sheetId, row: i, col: j });
      if (v instanceof DetailedCellError) throw new Error(`the card cell ${sheetName}!${a1(i, j)} shows ${v.value} ${v.message}`);
      row.push(v);
    }
    grid.push(row);
  }
  return { grid, engine, where: `${file} ${sheetName}!${cells}` };
}

/**
 * Compositions to mark: each text is a number or a formula of the card's workbook (e.g. Ageing!B3),
 * optionally preceded by a label and "=" ("grade L=Ageing!B3"). A range gives one mark per number.
 */
export function evaluateMarks(engine: HyperFormula, texts: string[]): Array<{ x: number; label: string }> {
  const parsed = texts.map((t) => {
    const eq = t.indexOf('=');
    return eq > 0 ? { label: t.slice(0, eq).trim(), formula: t.slice(eq + 1) } : { label: '', formula: t.replace(/^=/, '') };
  });
  const values = evaluateFormulas(engine, parsed.map((p) => `=${p.formula}`));
  const marks: Array<{ x: number; label: string }> = [];
  values.forEach((v, i) => {
    const cells = Array.isArray(v) ? v.flat() : [v];
    for (const c of cells) {
      if (c === null) continue;
      if (typeof c !== 'number' || !(c > 0 && c < 1)) {
        throw new Error(`--mark ${texts[i]}: gives ${JSON.stringify(c)}, not a composition strictly between 0 and 1`);
      }
      const x = Number(c.toPrecision(4));
      marks.push({ x: c, label: parsed[i].label ? `${parsed[i].label}, x0 = ${x}` : `x0 = ${x}` });
    }
  });
  return marks;
}
