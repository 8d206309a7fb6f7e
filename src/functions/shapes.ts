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
 *   FITMODEL     5th argument, 2 to FIT_CARD_ROWS.max; 24 without it 2 (empty rows after the card)
 *   FITRESID     3rd argument, 1 to FIT_RESID_MAX (>= data rows)       2
 *   FITCOV       4th argument + 1, from 2 to FIT_COV_MAX + 1             the same
 *   TBINODAL     3rd argument, a whole number 3 to 10000            6
 *   GAPBAND      3rd argument, a whole number 2 to 10000            7
 *   TCASCADE     2 (raffinate, extract)                             5
 *   TSTAGETABLE  4th argument (stages), a whole number 1 to 100      8
 * Every other function: one cell.
 */
export type LiteralArg = number | string | boolean | undefined;

export type Shape = { rows: number; cols: number } | { error: string };

/** Rows a GAPTABLE may ask for: two (its end temperatures) to a size a chart still reads. */
export const GAPTABLE_ROWS = { min: 2, max: 10000 } as const;

/** Rows a TBINODAL table may ask for: a branch's two ends and one tie-line between, to GAPTABLE's limit. */
export const TBINODAL_ROWS = { min: 3, max: 10000 } as const;

/** Most Redlich–Kister terms a fit may ask for. */
export const MAX_FIT_TERMS = 6;

/** Rows a FITMODEL card may spill: the default when the formula gives none, and the range allowed. */
export const FIT_CARD_ROWS = { default: 24, min: 2, max: 1000 } as const;

/** Most rows FITRESID spills (data rows), most free parameters FITCOV spills. */
export const FIT_RESID_MAX = 10000;
export const FIT_COV_MAX = 30;

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
  FITMODEL: (args) => (args[4] === undefined ? { rows: FIT_CARD_ROWS.default, cols: 2 }
    : counted(args, 'FITMODEL', 4, 'rows', FIT_CARD_ROWS.min, FIT_CARD_ROWS.max, '=MIXGAP.FITMODEL(A1:C6, E2:I12, , , 30)', 2)),
  FITRESID: (args) => counted(args, 'FITRESID', 2, 'rows', 1, FIT_RESID_MAX, '=MIXGAP.FITRESID(A1:C6, E2:I12, 11)', 2),
  FITCOV: (args) => {
    const shape = counted(args, 'FITCOV', 3, 'free parameters', 1, FIT_COV_MAX, '=MIXGAP.FITCOV(A1:C6, E2:I12, , 2)', 1);
    return 'error' in shape ? shape : { rows: shape.rows + 1, cols: shape.rows + 1 };
  },
  TBINODAL: (args) => counted(args, 'TBINODAL', 2, 'rows', TBINODAL_ROWS.min, TBINODAL_ROWS.max, '=MIXGAP.TBINODAL(298.15, B2:C9, 101)', 6),
  GAPBAND: (args) => counted(args, 'GAPBAND', 2, 'rows', GAPTABLE_ROWS.min, GAPTABLE_ROWS.max, '=MIXGAP.GAPBAND(300, 1200, 51, B2:D6)', 7),
  TCASCADE: () => ({ rows: 2, cols: 5 }),
  TSTAGETABLE: (args) => counted(args, 'TSTAGETABLE', 3, 'stages', 1, 100, '=MIXGAP.TSTAGETABLE(E6:G6, E7:G7, 0.6, 3, "lumic acid", 30, A4:B12)', 8),
};

/** Rows and columns of a function's spilled result, or why it cannot be known from the formula text. */
export function spillShape(id: string, args: LiteralArg[]): Shape {
  const rule = rules[id.toUpperCase()];
  return rule ? rule(args) : { rows: 1, cols: 1 };
}
