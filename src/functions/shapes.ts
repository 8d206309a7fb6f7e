/**
 * Sizes of spilled results, known from the formula text alone (the embedded engine must size a
 * spill before it computes). Excel does not need this: it sizes spills from the returned array.
 */
import { fittingSpillShape } from './fittingShapes';

export type LiteralArg = number | string | boolean | undefined;

/** Rows and columns of a function's spilled result, or why it cannot be known from the formula text. */
export function spillShape(id: string, args: LiteralArg[]): { rows: number; cols: number } | { error: string } {
  const fit = fittingSpillShape(id, args);
  if (fit) return fit;
  switch (id.toUpperCase()) {
    case 'GAPTABLE': {
      const rows = args[2];
      if (typeof rows !== 'number') {
        return {
          error:
            'GAPTABLE: write the number of rows (3rd argument) as a number in the formula, e.g. =MIXGAP.GAPTABLE(300, 1200, 51, B2:D3). ' +
            'The formula engine sizes a spilled table from the formula text before it computes, so it cannot take the size from a cell or a calculation (Excel can).',
        };
      }
      if (!(Number.isInteger(rows) && rows >= 2 && rows <= 10000)) {
        return { error: `GAPTABLE: rows = ${rows}: give a whole number of rows from 2 to 10000` };
      }
      return { rows, cols: 5 };
    }
    default:
      return { rows: 1, cols: 1 };
  }
}
