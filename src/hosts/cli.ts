/**
 * The `mixgap` command. `mixgap eval` evaluates formulas exactly as typed into a cell, with the
 * embedded engine and the same functions as the Excel add-in; `mixgap functions` lists them;
 * `mixgap calc` computes a whole .xlsx workbook; `mixgap diagram` draws a phase diagram of a card.
 * Bundled to dist/node/cli.js, it reads dist/functions.json (beside the bundle's folder) at run time.
 */
import { existsSync, readFileSync, writeFileSync } from 'fs';
import path from 'path';
import { Command, CommanderError, InvalidArgumentError } from 'commander';
import pkg from '../../package.json';
// Only types from the other host modules here: what a subcommand needs (the engine and the
// functions, ExcelJS, the plotting stack) is loaded by its action (see the actions below).
import type { CustomFunctionsMetadata } from './engine';
import type { FormulaResult, ResultCell } from './evaluate';
import { isFolderPath } from './output-path';

const EVAL_HELP = `
Each FORMULA is evaluated as if typed into a cell of its own sheet, e.g.
  mixgap eval '=MIXGAP.TCRIT(21000)' '=MIXGAP.GAPLOW(800, {21000,0,0})'
Without FORMULA arguments, formulas are read from standard input, one per line (blank lines skipped).
A text without the leading "=" is evaluated as a formula all the same.

Plain output: one line per formula.
  number     shortest text that reads back as the same double, e.g. 0.1234567890123456
  error      the code, two spaces, the message, e.g. "#NUM!  T must be above 0 K"
  spilled    rows separated by "; ", cells by ", ", e.g. "1, 2; 3, 4; 5, 6"
             (an error cell is written as its code and the message in parentheses)
--json: one JSON array with one entry per formula: a number, a string, a boolean, null (empty),
  a 2-D array for a spilled result, or {"error": "#N/A", "message": "..."} (also inside arrays).

Exit status: 0 when the formulas were evaluated (even if some cells show errors), 1 on usage errors.`;

function metadataPath(): string {
  // The bundle lives in dist/node/; the build writes functions.json to dist/.
  return path.join(__dirname, '..', 'functions.json');
}

function loadMetadata(): CustomFunctionsMetadata {
  const file = metadataPath();
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as CustomFunctionsMetadata;
  } catch (e) {
    throw new Error(`cannot read the function metadata ${file} (run \`npm run build\`): ${(e as Error).message}`);
  }
}

function isErrorCell(c: ResultCell): c is { error: string; message: string } {
  return typeof c === 'object' && c !== null;
}

function plainCell(c: ResultCell, inArray: boolean): string {
  if (c === null) return '';
  if (typeof c === 'boolean') return c ? 'TRUE' : 'FALSE';
  if (typeof c === 'number') return String(c); // shortest round-trip representation
  if (isErrorCell(c)) {
    const message = c.message.replace(/\s*\n\s*/g, ' '); // one line per formula
    return inArray ? `${c.error} (${message})` : `${c.error}  ${message}`;
  }
  return c;
}

export function formatPlain(r: FormulaResult): string {
  if (Array.isArray(r)) return r.map((row) => row.map((c) => plainCell(c, true)).join(', ')).join('; ');
  return plainCell(r, false);
}

const CALC_HELP = `
Reads WORKBOOK (.xlsx), evaluates every formula of every sheet with the embedded engine (Mixgap's
functions and the built-in spreadsheet functions; references across sheets, ranges, defined names)
and writes a copy in which every formula keeps its text and carries its computed value, so the copy
opens with numbers in place in any spreadsheet program. WORKBOOK itself is never modified.

  A spilled result (GAPTABLE, SEQUENCE, ...) fills the cells it covers with plain values; its first
  cell keeps the formula, stored as an array formula over the covered range.
  An error is stored as an error value; the summary lists the cells and what to fix.
  #SPILL!, #CYCLE! and #ERROR! (a formula the engine cannot read) are stored as #REF!, #REF!, #NAME?.

Output: -o FILE.xlsx, or -o FOLDER (created if needed) for FOLDER/<name>.computed.xlsx;
default <name>.computed.xlsx beside WORKBOOK. The copy is written to a temporary file in the same
folder and renamed into place, so a run that fails leaves no partial file.
Everything else of WORKBOOK (styles, comments, charts, pictures, pivot tables, names, validation,
conditional formats, macros of an .xlsm, whose copy is an .xlsm) is copied unchanged.

Exit status: 0 when the copy was written (even if some cells show errors), 1 otherwise.`;

const DIAGRAM_HELP = `
CARD is a parameter card: a .csv file of key,value rows (e.g. "model,regular" and "omega,21"),
or a range of an .xlsx workbook (--range A1:B8 with --sheet NAME, or --range NAME!A1:B8); the
workbook is evaluated first, so the card and the marks may be formulas.
Every point comes from the cell functions (GAPTABLE, TCRIT, XCRIT, CRITKIND, CHECKCARD).
A three-component card (keys such as AB.L0) is drawn as a composition triangle at --at T, with
TBINODAL, TPLAIT, TTRIANGLE, the feeds of --feed xB,xC split by TSPLIT, and the stages of
--cascade 'feed=xB,xC; solvent=xB,xC; ratio=S/F; stages=N; solute=NAME' from TSTAGETABLE
(amounts=F,S instead of ratio=; raffinates R1..RN, extracts E1..EN and their tie-lines).

Temperatures (--tmin, --tmax, the axis) are in the card's temperature unit, or in --temperature-unit.
Default range: from half the lowest critical temperature (in kelvin) to 6 % above the highest.
The composition axis covers everything drawn with a margin; --full-range draws 0 to 1, and
--log B (or --log A) a logarithmic axis of x (or of 1 - x) for a branch that hugs an axis.

Writes OUT.svg and OUT.png: -o OUT (a trailing .svg or .png is dropped), or -o FOLDER/ for
FOLDER/<name>.diagram.*; default <name>.diagram.svg and .png beside CARD.

Example:
  mixgap diagram assets/demo.xlsx --range Card!A1:B7 --mark 'grade L=Ageing!B4' -o out/demo/`;

function positiveInteger(text: string): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n < 2) throw new InvalidArgumentError('give a whole number of 2 or more');
  return n;
}

function finiteNumber(text: string): number {
  const n = Number(text);
  if (text.trim() === '' || !Number.isFinite(n)) throw new InvalidArgumentError('give a number');
  return n;
}

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}

/** OUT of `mixgap diagram`, without extension. */
function diagramBase(card: string, output?: string): string {
  const name = `${path.basename(card).replace(/\.(csv|xlsx)$/i, '')}.diagram`;
  if (!output) return path.join(path.dirname(card), name);
  return isFolderPath(output) ? path.join(output, name) : output.replace(/\.(svg|png)$/i, '');
}

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString('utf8');
}

// ---------------------------------------------------------------------------------------------
// The actions, one per subcommand. Each loads what it needs when it runs (`import()`, a chunk of
// the bundle), so that starting the command costs only what the subcommand uses.
// ---------------------------------------------------------------------------------------------

interface EvalOptions { json?: boolean }

/** `mixgap eval`: each formula in a cell of its own; one line (or JSON entry) per formula. */
async function evalAction(formulaArgs: string[], opts: EvalOptions): Promise<void> {
  const formulas = formulaArgs.length > 0
    ? formulaArgs
    : (await readStdin()).split(/\r?\n/).filter((line) => line.trim() !== '');
  const metadata = loadMetadata();
  const [{ buildEngine, NAMESPACE }, { evaluateFormulas }, { spillShape }] = await Promise.all([
    import(/* webpackChunkName: "engine" */ './engine'), import(/* webpackChunkName: "engine" */ './evaluate'),
    import(/* webpackChunkName: "engine" */ '../functions/shapes')]);
  // Loading the cell functions builds the cards' unit system (mathjs), a good part of the
  // start-up: a formula can only call one if its text names it, so only then are they loaded.
  const callsMixgap = formulas.some((f) => f.toUpperCase().includes(`${NAMESPACE}.`));
  const implementations = callsMixgap ? await import(/* webpackChunkName: "functions" */ '../functions/index') : {};
  const engine = buildEngine(metadata, implementations, spillShape);
  const results = evaluateFormulas(engine, formulas);
  engine.destroy();
  process.stdout.write(opts.json ? `${JSON.stringify(results)}\n` : results.map((r) => `${formatPlain(r)}\n`).join(''));
}

/** `mixgap functions`: one line per signature, then its description indented. */
async function functionsAction(): Promise<void> {
  const { NAMESPACE } = await import(/* webpackChunkName: "engine" */ './engine');
  for (const f of loadMetadata().functions) {
    const params = f.parameters.map((p) => (p.optional ? `[${p.name}]` : p.name)).join(', ');
    const description = (f.description ?? '').replace(/\s+/g, ' ').trim();
    process.stdout.write(`${NAMESPACE}.${f.name}(${params})\n${description ? `    ${description}\n` : ''}`);
  }
}

interface CalcOptions { output?: string; quiet?: boolean }

/** `mixgap calc`: the computed copy of a workbook, and a summary. */
async function calcAction(workbook: string, opts: CalcOptions): Promise<void> {
  const { calcWorkbook, formatSummary } = await import(/* webpackChunkName: "calc" */ './calc');
  const result = await calcWorkbook(workbook, loadMetadata(), {
    output: opts.output,
    progressStream: opts.quiet ? undefined : process.stderr,
  });
  if (!opts.quiet) process.stdout.write(formatSummary(result));
}

interface DiagramOptions {
  sheet?: string; range?: string; tmin?: number; tmax?: number; temperatureUnit?: string;
  rows?: number; mark: string[]; title?: string; output?: string; fullRange?: boolean; log?: string; at?: number; feed: string[]; cascade?: string;
}

/** `mixgap diagram`: OUT.svg and OUT.png of a card, and what they show. */
async function diagramAction(card: string, opts: DiagramOptions, command: Command): Promise<void> {
  const [{ writeAtomically }, { cardFromCsv, cardFromXlsx, evaluateMarks }, { BAND_LABEL, diagramData, diagramSpec, renderPng, renderSvg }, { temperatureUnit }] =
    await Promise.all([import(/* webpackChunkName: "calc" */ './calc'), import(/* webpackChunkName: "diagram" */ './card-source'),
      import(/* webpackChunkName: "diagram" */ './diagram'), import(/* webpackChunkName: "diagram" */ '../core/units')]);
  if (opts.temperatureUnit !== undefined) {
    // A unit the cards do not read is the option's fault, not the card's: a usage error (exit 1).
    try {
      temperatureUnit(opts.temperatureUnit);
    } catch (e) {
      command.error(`error: option '--temperature-unit <unit>' argument '${opts.temperatureUnit}' is invalid. ${(e as Error).message}`);
    }
  }
  const metadata = loadMetadata();
  if (!existsSync(card)) throw new Error(`no such file: ${card}`);
  const isXlsx = /\.xlsx$/i.test(card);
  if (isXlsx && !opts.range) throw new Error('an .xlsx card needs --range (e.g. --range Card!A1:B8)');
  const source = isXlsx ? await cardFromXlsx(card, metadata, opts.range!, opts.sheet) : cardFromCsv(card, metadata);
  const triangle = await import(/* webpackChunkName: "diagram" */ './triangle'); // a three-component card: a composition triangle
  if (triangle.isTernaryGrid(source.grid)) { source.engine.destroy(); return triangle.triangleAction(metadata, source.grid, source.where, opts, diagramBase(card, opts.output), writeAtomically); }
  let marks;
  try {
    marks = evaluateMarks(source.engine, opts.mark);
  } finally {
    source.engine.destroy();
  }
  const data = diagramData(metadata, source.grid, {
    tmin: opts.tmin, tmax: opts.tmax, rows: opts.rows, temperatureUnit: opts.temperatureUnit, marks, title: opts.title,
    fullRange: opts.fullRange, log: opts.log,
  });
  const svg = await renderSvg(diagramSpec(data));
  const base = diagramBase(card, opts.output);
  await writeAtomically(`${base}.svg`, async (tmp) => writeFileSync(tmp, svg));
  await writeAtomically(`${base}.png`, async (tmp) => writeFileSync(tmp, renderPng(svg)));
  const plural = (n: number, what: string) => `${n} ${what}${n === 1 ? '' : 's'}`;
  process.stdout.write(`mixgap diagram: ${source.where}\n  ${data.card}\n  ${data.tmin} to ${data.tmax} ${data.temperatureUnit}; ` +
    `${plural(data.critical.length, 'critical point')} shown; ${plural(data.marks.length, 'marked composition')}` +
    `${data.band.length > 0 ? `; the binodal's band (${BAND_LABEL}) shaded` : ''}\n` +
    `  ${base}.svg\n  ${base}.png\n`);
}

// ---------------------------------------------------------------------------------------------
// The program: subcommands, arguments, options and help texts; the actions above do the work.
// ---------------------------------------------------------------------------------------------

/** The `mixgap` program with its subcommands. */
export function program(): Command {
  const mixgap = new Command('mixgap')
    .description('Miscibility gaps of binary and three-component solutions, as spreadsheet cell functions, from the command line.')
    .version(pkg.version, '-V, --version', 'print the version of Mixgap')
    .exitOverride()
    .showHelpAfterError();

  mixgap
    .command('eval')
    .description('evaluate formulas as typed into spreadsheet cells')
    .argument('[formula...]', 'formulas such as =MIXGAP.TCRIT(21000); none: read them from standard input')
    .option('--json', 'print one JSON array with one entry per formula')
    .addHelpText('after', EVAL_HELP)
    .action(evalAction);

  mixgap
    .command('functions')
    .description('list the Mixgap cell functions: one line per signature, then its description indented')
    .action(functionsAction);

  mixgap
    .command('calc')
    .description('evaluate every formula of an .xlsx workbook and write a copy with the computed values')
    .argument('<workbook>', 'the .xlsx file to evaluate (never modified)')
    .option('-o, --output <path>', 'the copy: a .xlsx file, or a folder for <name>.computed.xlsx')
    .option('-q, --quiet', 'no progress bar and no summary')
    .addHelpText('after', CALC_HELP)
    .action(calcAction);

  mixgap
    .command('diagram')
    .description('draw the phase diagram (binodal, spinodal, critical points) of a parameter card as SVG and PNG')
    .argument('<card>', 'a .csv file of key,value rows, or an .xlsx workbook with --range')
    .option('--sheet <name>', 'sheet of the card in an .xlsx workbook (default: the first)')
    .option('--range <range>', 'range of the card in an .xlsx workbook, e.g. A1:B8 or Card!A1:B8')
    .option('--tmin <T>', 'lowest temperature shown (card unit)', finiteNumber)
    .option('--tmax <T>', 'highest temperature shown (card unit)', finiteNumber)
    .option('--temperature-unit <unit>', 'draw in K or °C instead of the card\'s unit')
    .option('--rows <n>', 'temperatures computed per gap (GAPTABLE rows, default 201)', positiveInteger)
    .option('--mark <x>', 'an overall composition to mark: a number, a formula such as Ageing!B4, or LABEL=... (repeatable)', collect, [])
    .option('--title <text>', 'title of the picture')
    .option('--full-range', 'composition axis from 0 to 1 (default: around everything drawn, with a margin)')
    .option('--log <component>', 'logarithmic composition axis: B for x (a dilute branch near x = 0), A for 1 - x (near x = 1)')
    .option('--at <T>', 'a three-component card: the temperature of its triangle (card unit)', finiteNumber)
    .option('--feed <xB,xC>', 'a three-component card: a feed to mark with its phases, x_B,x_C or LABEL=x_B,x_C (repeatable)', collect, [])
    .option('--cascade <spec>', "a three-component card: a counter-current cascade to draw stage by stage, 'feed=xB,xC; solvent=xB,xC; ratio=S/F; stages=N; solute=NAME'")
    .option('-o, --output <path>', 'OUT for OUT.svg and OUT.png, or a folder')
    .addHelpText('after', DIAGRAM_HELP)
    .action(diagramAction);

  return mixgap;
}

/** Runs the command with `argv` as in process.argv; resolves to the exit status. */
export async function main(argv: string[]): Promise<number> {
  try {
    await program().parseAsync(argv);
    return 0;
  } catch (e) {
    // Help and version exit 0; unknown options, missing commands and the like are usage errors.
    if (e instanceof CommanderError) return e.exitCode === 0 ? 0 : 1;
    if (e instanceof Error && !(e instanceof TypeError || e instanceof ReferenceError)) {
      // A file that cannot be read or written, a card that cannot be drawn: say what, without a trace.
      process.stderr.write(`mixgap: ${e.message}\n`);
      return 1;
    }
    throw e;
  }
}
