/**
 * `mixgap calc`: a workbook in, a computed copy out. Reads the .xlsx package (./xlsx-package),
 * evaluates it with the embedded engine (./workbook), and writes a copy of the package in which
 * only the computed cells differ: every other part (styles, comments, charts, images, pivot tables,
 * defined names, data validation, conditional formats, macros) is copied byte for byte. The copy
 * goes to a temporary file in the output folder and is renamed into place, so a run that fails
 * leaves no half-written output. The input is only read.
 */
import { existsSync, mkdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'fs';
import path from 'path';
import { SingleBar, Presets } from 'cli-progress';
import type { CustomFunctionsMetadata } from './engine';
import { isFolderPath } from './output-path';
import { buildMixgapEngine } from './mixgap-engine';
import { evaluateWorkbook, WORKBOOK_ENGINE_CONFIG } from './workbook';
import type { CellErrorReport, Evaluation, WorkbookReport } from './workbook';
import { readPackage, writePackage } from './xlsx-package';

/** Name of the computed copy of `input`: report.xlsx -> report.computed.xlsx, book.xlsm -> book.computed.xlsm. */
export function computedName(input: string, macroEnabled = /\.xlsm$/i.test(input)): string {
  const base = path.basename(input).replace(/\.xls[xm]$/i, '');
  return `${base}.computed.${macroEnabled ? 'xlsm' : 'xlsx'}`;
}

/** The formats `calc` writes, for messages. */
const FORMATS = '.xlsx (.xlsm for a workbook with macros)';

/** Refuses an output name whose extension is not what the copy will be. */
function checkOutputName(output: string, macroEnabled: boolean | undefined): void {
  const ext = path.extname(output).toLowerCase();
  if (ext !== '.xlsx' && ext !== '.xlsm') {
    throw new Error(`cannot write ${output}: mixgap calc writes ${FORMATS}; give -o NAME.xlsx or -o FOLDER/`);
  }
  if (macroEnabled === true && ext !== '.xlsm') {
    throw new Error(`cannot write ${output}: the workbook has macros, which the copy keeps, so it must be an .xlsm; give -o NAME.xlsm or -o FOLDER/`);
  }
  if (macroEnabled === false && ext !== '.xlsx') {
    throw new Error(`cannot write ${output}: the workbook has no macros, so the copy is an .xlsx; give -o NAME.xlsx or -o FOLDER/`);
  }
}

/**
 * Where the copy goes. No `output`: beside the input. An existing folder, or a path ending in a
 * separator: inside it, with the default name. Anything else: that file.
 */
export function outputPath(input: string, output?: string): string {
  if (!output) return path.join(path.dirname(input), computedName(input));
  return isFolderPath(output) ? path.join(output, computedName(input)) : output;
}

/** Why a file operation failed, in words (the system's code in brackets). */
function reason(e: unknown): string {
  const err = e as NodeJS.ErrnoException;
  const words: Record<string, string> = {
    EACCES: 'permission denied',
    EPERM: 'not permitted',
    EROFS: 'read-only file system',
    ENOSPC: 'no space left on the device',
    ENOTDIR: 'a part of the path is a file, not a folder',
    EEXIST: 'a file of that name is in the way',
    EISDIR: 'it is a folder',
    ENOENT: 'no file can be created there',
  };
  return err.code && words[err.code] ? `${words[err.code]} (${err.code})` : err.message ?? String(e);
}

/**
 * Writes with `write` to a temporary file beside `target`, then renames it to `target`. A failure
 * names the folder that could not be written (never the temporary file).
 */
export async function writeAtomically(target: string, write: (tmp: string) => Promise<void>): Promise<void> {
  const folder = path.dirname(path.resolve(target));
  const shown = path.dirname(target) || '.';
  try {
    mkdirSync(folder, { recursive: true });
  } catch (e) {
    throw new Error(`cannot write to ${shown}: ${reason(e)}`);
  }
  const tmp = path.join(folder, `.${path.basename(target)}.${process.pid}.tmp`);
  try {
    await write(tmp);
  } catch (e) {
    rmSync(tmp, { force: true });
    const code = (e as NodeJS.ErrnoException).code;
    if (code && code in { EACCES: 1, EPERM: 1, EROFS: 1, ENOSPC: 1, ENOTDIR: 1, ENOENT: 1, EDQUOT: 1, EIO: 1 }) {
      throw new Error(`cannot write to ${shown}: ${reason(e)}`);
    }
    throw e;
  }
  try {
    renameSync(tmp, target);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw new Error(`cannot write ${target}: ${reason(e)}`);
  }
}

export interface CalcOptions {
  output?: string;
  /** Stream for the progress bar (a terminal); none: no bar. */
  progressStream?: NodeJS.WriteStream;
  /** Show the bar only once a run has taken this long (ms). */
  progressAfterMs?: number;
}

export interface CalcResult {
  input: string;
  output: string;
  report: WorkbookReport;
  seconds: number;
}

/** Evaluates the workbook at `input` and writes its computed copy; resolves to what was done. */
export async function calcWorkbook(input: string, metadata: CustomFunctionsMetadata, options: CalcOptions = {}): Promise<CalcResult> {
  const started = Date.now();
  let output = outputPath(input, options.output);
  if (path.resolve(output) === path.resolve(input)) {
    throw new Error(`the output ${output} is the input: mixgap calc never overwrites its input; give another -o`);
  }
  // The default name (beside the input, or in the folder -o gives) follows the package: a workbook
  // with macros is copied to an .xlsm. A name given with -o must be what the copy will be.
  const defaultName = !options.output || output === path.join(options.output, computedName(input));
  if (!defaultName) checkOutputName(output, undefined);
  if (!existsSync(input)) throw new Error(`no such file: ${input}`);

  const book = await readPackage(readFileSync(input), input);
  if (defaultName) output = path.join(path.dirname(output), computedName(input, book.macroEnabled));
  else checkOutputName(output, book.macroEnabled);
  if (path.resolve(output) === path.resolve(input)) {
    throw new Error(`the output ${output} is the input: mixgap calc never overwrites its input; give another -o`);
  }

  let bar: SingleBar | undefined;
  const stream = options.progressStream;
  const after = options.progressAfterMs ?? 1000;
  let evaluation: Evaluation | undefined;
  try {
    evaluation = await evaluateWorkbook(book, (content) => buildMixgapEngine(metadata, WORKBOOK_ENGINE_CONFIG, content), (done, total) => {
      if (!stream?.isTTY) return;
      if (!bar && Date.now() - started >= after && done < total) {
        bar = new SingleBar({
          stream,
          format: 'evaluating |{bar}| {value}/{total} formulas  {duration_formatted}',
          hideCursor: true,
          clearOnComplete: true,
        }, Presets.shades_classic);
        bar.start(total, done);
      }
      bar?.update(done);
    });
  } finally {
    bar?.stop();
    evaluation?.engine.destroy();
  }
  const { report, edits } = evaluation;

  const bytes = await writePackage(book, edits);
  await writeAtomically(output, async (tmp) => writeFileSync(tmp, bytes));
  return { input, output, report, seconds: (Date.now() - started) / 1000 };
}

/** Errors counted by code, most frequent first: "#N/A 12, #NUM! 1". */
function byCode(errors: CellErrorReport[]): string {
  const counts = new Map<string, number>();
  for (const e of errors) counts.set(e.code, (counts.get(e.code) ?? 0) + 1);
  return [...counts].sort((a, b) => b[1] - a[1]).map(([code, n]) => `${code} ${n}`).join(', ');
}

/** The end-of-run summary: one screen at most (the first `maxListed` formula errors are listed). */
export function formatSummary(r: CalcResult, maxListed = 8): string {
  const { report } = r;
  const own = report.errors.filter((e) => !e.spilled);
  const spilled = report.errors.filter((e) => e.spilled);
  const lines = [
    `mixgap calc: ${r.input} -> ${r.output}`,
    `  sheets     ${report.sheets.length} (${report.sheets.join(', ')})`,
    `  formulas   ${report.formulas} evaluated; ${report.spills} spilled over ${report.spilledCells} more cells`,
    `  errors     ${own.length} formula cell${own.length === 1 ? '' : 's'}${own.length ? ` (${byCode(own)})` : ''}` +
      `${spilled.length ? `; ${spilled.length} cells of spilled tables (${byCode(spilled)})` : ''}`,
  ];
  for (const e of own.slice(0, maxListed)) {
    const message = e.message.replace(/\s+/g, ' ').trim();
    const where = `${e.sheet}!${e.address}`;
    lines.push(`    ${where.padEnd(14)} ${e.code.padEnd(8)} ${message.length > 90 ? `${message.slice(0, 87)}...` : message}`);
  }
  if (own.length > maxListed) lines.push(`    ... and ${own.length - maxListed} more`);
  for (const note of report.notes ?? []) lines.push(`  note       ${note}`);
  lines.push(`  time       ${r.seconds.toFixed(2)} s`);
  return `${lines.join('\n')}\n`;
}
