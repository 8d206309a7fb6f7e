/**
 * Sizes of spilled results, known from the formula text alone (the embedded engine must size a
 * spill before it computes). Excel does not need this: it sizes spills from the returned array.
 *
 *   function     rows                                             columns
 *   GAPTABLE     3rd argument, a whole number 2 to 10000            5
 *   FITTIELINES  2nd argument, a whole number 1 to MAX_FIT_TERMS    3
 *   FITCRIT      2                                                  3
 *   FITNRTL      6                                                  2
 *   TSPLIT       3 (empty rows after the last phase)                4
 *   TPLAIT       1                                                  3
 *   TTRIANGLE    3                                                  3
 *   TCASCADE     2 (raffinate, extract)                             5
 * Every other function: one cell.
 */
export type LiteralArg = number | string | boolean | undefined;

export type Shape = { rows: number; cols: number } | { error: string };

/** Rows a GAPTABLE may ask for: two (its end temperatures) to a size a chart still reads. */
export const GAPTABLE_ROWS = { min: 2, max: 10000 } as const;

/** Most Redlich–Kister terms a fit may ask for. */
export const MAX_FIT_TERMS = 6;

/** A count written in the formula as argument `index` (0-based), within [min, max]. */
function counted(
  args: LiteralArg[], fn: string, index: number, what: string, min: number, max: number, example: string, cols: number,
): Shape {
  const n = args[index];
  const position = ['1st', '2nd', '3rd', '4th', '5th'][index];
  if (typeof n !== 'number') {
    return {
      error:
        `${fn}: write the number of ${what} (${position} argument) as a number in the formula, e.g. ${example}. ` +
        'The formula engine sizes a spilled table from the formula text before it computes, so it cannot take the size from a cell or a calculation (Excel can).',
    };
  }
  if (!(Number.isInteger(n) && n >= min && n <= max)) {
    return { error: `${fn}: ${what} = ${n}: give a whole number of ${what} from ${min} to ${max}` };
  }
  return { rows: n, cols };
}

const rules: Record<string, (args: LiteralArg[]) => Shape> = {
  GAPTABLE: (args) => counted(args, 'GAPTABLE', 2, 'rows', GAPTABLE_ROWS.min, GAPTABLE_ROWS.max, '=MIXGAP.GAPTABLE(300, 1200, 51, B2:D3)', 5),
  FITTIELINES: (args) => counted(args, 'FITTIELINES', 1, 'terms', 1, MAX_FIT_TERMS, '=MIXGAP.FITTIELINES(A2:C9, 2, TRUE)', 3),
  FITCRIT: () => ({ rows: 2, cols: 3 }),
  FITNRTL: () => ({ rows: 6, cols: 2 }),
  TSPLIT: () => ({ rows: 3, cols: 4 }),
  TPLAIT: () => ({ rows: 1, cols: 3 }),
  TTRIANGLE: () => ({ rows: 3, cols: 3 }),
  TCASCADE: () => ({ rows: 2, cols: 5 }),
};

/** Rows and columns of a function's spilled result, or why it cannot be known from the formula text. */
export function spillShape(id: string, args: LiteralArg[]): Shape {
  const rule = rules[id.toUpperCase()];
  return rule ? rule(args) : { rows: 1, cols: 1 };
}
