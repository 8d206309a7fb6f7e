/**
 * Spill sizes of the fitting functions (./fitting.ts), known from the formula text alone, for the
 * embedded engine (see ./shapes.ts). Returns undefined for every other function.
 *
 *   FITTIELINES  terms x 3     terms = the 2nd argument, a whole number 1 to 6 written in the formula
 *   FITCRIT      2 x 3
 *   FITNRTL      6 x 2
 */
import type { LiteralArg } from './shapes';

/** Most Redlich–Kister terms a fit may ask for. */
export const MAX_FIT_TERMS = 6;

export function fittingSpillShape(id: string, args: LiteralArg[]): { rows: number; cols: number } | { error: string } | undefined {
  switch (id.toUpperCase()) {
    case 'FITTIELINES': {
      const terms = args[1];
      if (typeof terms !== 'number') {
        return {
          error:
            'FITTIELINES: write the number of terms (2nd argument) as a number in the formula, e.g. =MIXGAP.FITTIELINES(A2:C9, 2, TRUE). ' +
            'The formula engine sizes a spilled table from the formula text before it computes, so it cannot take the size from a cell or a calculation (Excel can).',
        };
      }
      if (!(Number.isInteger(terms) && terms >= 1 && terms <= MAX_FIT_TERMS)) {
        return { error: `FITTIELINES: terms = ${terms}: give a whole number of Redlich–Kister terms from 1 to ${MAX_FIT_TERMS}` };
      }
      return { rows: terms, cols: 3 };
    }
    case 'FITCRIT':
      return { rows: 2, cols: 3 };
    case 'FITNRTL':
      return { rows: 6, cols: 2 };
    default:
      return undefined;
  }
}
