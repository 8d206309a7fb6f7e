/**
 * `mixgap calc`: a workbook in, a computed copy out. Reads the .xlsx with ExcelJS, evaluates it with
 * the embedded engine (./workbook), writes the copy to a temporary file in the output folder and
 * renames it into place, so a run that fails leaves no half-written output. The input is only read.
 */
import { existsSync, mkdirSync, renameSync, rmSync, statSync } from 'fs';
import path from 'path';
import { SingleBar, Presets } from 'cli-progress';
import ExcelJS from 'exceljs';
import type { CustomFunctionsMetadata } from './engine';
import { isFolderPath } from './output-path';
import { buildMixgapEngine } from './mixgap-engine';
import { evaluateWorkbook, WORKBOOK_ENGINE_CONFIG } from './workbook';
import type { CellErrorReport, WorkbookReport } from './workbook';

/** Name of the computed copy of `input`: report.xlsx -> report.computed.xlsx. */
export function computedName(input: string): string {
  const base = path.basename(input).replace(/\.xlsx$/i, '');
  return `${base}.computed.xlsx`;
}

/**
 * Where the copy goes. No `output`: beside the input. An existing folder, or a path ending in a
 * separator: inside it, with the default name. Anything else: that file.
 */
export function outputPath(input: string, output?: string): string {
  if (!output) return path.join(path.dirname(input), computedName(input));
  return isFolderPath(output) ? path.join(output, computedName(input)) : output;
}

/** Writes with `write` to a temporary file beside `target`, then renames it to `target`. */
export async function writeAtomically(target: string, write: (tmp: string) => Promise<void>): Promise<void> {
  mkdirSync(path.dirname(path.resolve(target)), { recursive: true });
  const tmp = path.join(path.dirname(path.resolve(target)), `.${path.basename(target)}.${process.pid}.tmp`);
  try {
    await write(tmp);
    renameSync(tmp, target);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
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
  const output = outputPath(input, options.output);
  if (path.resolve(output) === path.resolve(input)) {
    throw new Error(`the output ${output} is the input: mixgap calc never overwrites its input; give another -o`);
  }
  if (!existsSync(input)) throw new Error(`no such file: ${input}`);

  const wb = new ExcelJS.Workbook();
  await wb.xlsx.readFile(input);

  let bar: SingleBar | undefined;
  const stream = options.progressStream;
  const after = options.progressAfterMs ?? 1000;
  const engine = buildMixgapEngine(metadata, WORKBOOK_ENGINE_CONFIG);
  let report: WorkbookReport;
  try {
    report = await evaluateWorkbook(wb, engine, (done, total) => {
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
    engine.destroy();
  }

  await writeAtomically(output, (tmp) => wb.xlsx.writeFile(tmp));
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
  lines.push(`  time       ${r.seconds.toFixed(2)} s`);
  return `${lines.join('\n')}\n`;
}
