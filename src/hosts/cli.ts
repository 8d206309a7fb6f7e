/**
 * The `mixgap` command. `mixgap eval` evaluates formulas exactly as typed into a cell, with the
 * embedded engine and the same functions as the Excel add-in; `mixgap functions` lists them.
 * Bundled to dist/node/cli.js, it reads dist/functions.json (beside the bundle's folder) at run time.
 */
import { readFileSync } from 'fs';
import path from 'path';
import { Command, CommanderError } from 'commander';
import type { CustomFunctionsMetadata } from './engine';
import { NAMESPACE } from './engine';
import { evaluateFormulas } from './evaluate';
import type { FormulaResult, ResultCell } from './evaluate';
import { buildMixgapEngine } from './mixgap-engine';

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

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString('utf8');
}

/** Runs the command with `argv` as in process.argv; resolves to the exit status. */
export async function main(argv: string[]): Promise<number> {
  const program = new Command('mixgap')
    .description('Miscibility gaps of binary solutions, as spreadsheet cell functions, from the command line.')
    .exitOverride()
    .showHelpAfterError();

  let status = 0;

  program
    .command('eval')
    .description('evaluate formulas as typed into spreadsheet cells')
    .argument('[formula...]', 'formulas such as =MIXGAP.TCRIT(21000); none: read them from standard input')
    .option('--json', 'print one JSON array with one entry per formula')
    .addHelpText('after', EVAL_HELP)
    .action(async (formulaArgs: string[], opts: { json?: boolean }) => {
      const formulas = formulaArgs.length > 0
        ? formulaArgs
        : (await readStdin()).split(/\r?\n/).filter((line) => line.trim() !== '');
      const engine = buildMixgapEngine(loadMetadata());
      const results = evaluateFormulas(engine, formulas);
      engine.destroy();
      process.stdout.write(opts.json ? `${JSON.stringify(results)}\n` : results.map((r) => `${formatPlain(r)}\n`).join(''));
    });

  program
    .command('functions')
    .description('list the Mixgap cell functions: one line per signature, then its description indented')
    .action(() => {
      for (const f of loadMetadata().functions) {
        const params = f.parameters.map((p) => (p.optional ? `[${p.name}]` : p.name)).join(', ');
        const description = (f.description ?? '').replace(/\s+/g, ' ').trim();
        process.stdout.write(`${NAMESPACE}.${f.name}(${params})\n${description ? `    ${description}\n` : ''}`);
      }
    });

  try {
    await program.parseAsync(argv);
  } catch (e) {
    if (e instanceof CommanderError) {
      // Help and version exit 0; unknown options, missing commands and the like are usage errors.
      status = e.exitCode === 0 ? 0 : 1;
    } else {
      throw e;
    }
  }
  return status;
}
