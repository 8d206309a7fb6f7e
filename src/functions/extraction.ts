/**
 * Extraction cascades in cells (ternary conventions: components A, B, C; mole fractions, volume
 * fractions for Flory–Huggins). A stream is a composition (a range of two cells x_B, x_C or three
 * cells x_A, x_B, x_C; a fraction may be 0: a pure solvent, a feed without solvent) and an amount;
 * the amounts are a solvent-to-feed ratio (one number: per mole of feed) or a range of two
 * numbers (feed, solvent: any one unit of amount, moles of sites for Flory–Huggins). The core is
 * src/core/ternary/extraction.ts. Cross-current stages need no function of their own: they are
 * TSPLIT cells chained by hand (README, "Extraction cascades"). TSTAGETABLE spills every stage of
 * a counter-current cascade.
 */
import { cascade, MAX_STAGES, stagesFor, type Stream } from '../core/ternary/extraction';
import type { TernaryPoint } from '../core/ternary/split';
import { number } from './args';
import { gridNumber, isEmpty, toGrid } from './cells';
import { CellFailure } from './errors';
import { composition, tcell, tempIn, ternaryComponent } from './ternary';

/** Rows and columns of TCASCADE's table (fixed, so that the formula engine can size it). */
export const TCASCADE_ROWS = 2, TCASCADE_COLS = 5;

/**
 * Counter-current extraction with N equilibrium stages at T: feed into stage 1, solvent into stage
 * N. A table of 2 rows x 5 columns: the final raffinate (row 1) and the final extract (row 2),
 * each with x_A, x_B, x_C, its amount and its share of the solute fed (moles of solute in the
 * stream per mole in the feed; the extract's is the solute recovery).
 * @customfunction
 * @helpurl https://localhost:3000/help/TCASCADE.html
 * @param feed Feed composition: a range of two cells (x_B, x_C) or three (x_A, x_B, x_C).
 * @param solvent Solvent composition: a range of two or three cells, as the feed.
 * @param amounts Solvent-to-feed ratio (one number, moles of solvent per mole of feed), or a range of two: feed and solvent amounts.
 * @param N Number of equilibrium stages (whole number, 1 to 100).
 * @param solute The solute: "A", "B", "C" or the card's component name.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns 2 x 5 table: raffinate and extract rows of x_A, x_B, x_C, amount, share of the solute fed.
 */
export function tCascade(feed: any[][], solvent: any[][], amounts: any[][], N: number, solute: string, T: number, params: any[][]): any[][] {
  return tcell(params, (sys) => {
    const s = streams(feed, solvent, amounts);
    const n = stageCount(N);
    const i = ternaryComponent(solute, sys, 'solute');
    const r = cascade(sys.model, tempIn(sys, T), s.feed, s.solvent, n, i);
    const fed = s.feed.amount * part(s.feed.x, i);
    const row = (st: Stream) => [st.x.xA, st.x.xB, st.x.xC, st.amount, (st.amount * part(st.x, i)) / fed];
    const extract = row(r.extract);
    extract[4] = r.recovery;
    return [row(r.raffinate), extract];
  });
}

/** Columns of TSTAGETABLE's table: raffinate x_A, x_B, x_C, amount; extract x_A, x_B, x_C, amount. */
export const TSTAGETABLE_COLS = 8;

/**
 * The stages of a counter-current cascade (TCASCADE's arguments), one row per stage 1 ... N: the
 * raffinate and the extract leaving that stage, each x_A, x_B, x_C and its amount. The two
 * streams of a row are the two phases of that stage's split (one tie-line); the raffinate of row
 * N and the extract of row 1 are TCASCADE's final raffinate and extract. For a triangle picture
 * of the cascade (raffinates and extracts stage by stage).
 * @customfunction
 * @helpurl https://localhost:3000/help/TSTAGETABLE.html
 * @param feed Feed composition: a range of two cells (x_B, x_C) or three (x_A, x_B, x_C).
 * @param solvent Solvent composition: a range of two or three cells, as the feed.
 * @param amounts Solvent-to-feed ratio (one number, moles of solvent per mole of feed), or a range of two: feed and solvent amounts.
 * @param N Number of equilibrium stages (whole number, 1 to 100); the table has N rows.
 * @param solute The solute: "A", "B", "C" or the card's component name.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns N x 8 table: per stage, the raffinate's x_A, x_B, x_C, amount, then the extract's x_A, x_B, x_C, amount.
 */
export function tStageTable(feed: any[][], solvent: any[][], amounts: any[][], N: number, solute: string, T: number, params: any[][]): any[][] {
  return tcell(params, (sys) => {
    const s = streams(feed, solvent, amounts);
    const n = stageCount(N);
    const i = ternaryComponent(solute, sys, 'solute');
    const r = cascade(sys.model, tempIn(sys, T), s.feed, s.solvent, n, i);
    const cells = (st: Stream) => [st.x.xA, st.x.xB, st.x.xC, st.amount];
    return r.stages.map((st) => [...cells(st.raffinate), ...cells(st.extract)]);
  });
}

/**
 * Solute recovery of a counter-current cascade of N equilibrium stages at T: moles of the solute
 * in the final extract per mole of it in the feed (TCASCADE's row 2, column 5, in one cell).
 * @customfunction
 * @helpurl https://localhost:3000/help/TRECOVERY.html
 * @param feed Feed composition: a range of two cells (x_B, x_C) or three (x_A, x_B, x_C).
 * @param solvent Solvent composition: a range of two or three cells, as the feed.
 * @param amounts Solvent-to-feed ratio (one number, moles of solvent per mole of feed), or a range of two: feed and solvent amounts.
 * @param N Number of equilibrium stages (whole number, 1 to 100).
 * @param solute The solute: "A", "B", "C" or the card's component name.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @returns Recovery (0 to 1).
 */
export function tRecovery(feed: any[][], solvent: any[][], amounts: any[][], N: number, solute: string, T: number, params: any[][]): number {
  return tcell(params, (sys) => {
    const s = streams(feed, solvent, amounts);
    const n = stageCount(N);
    const i = ternaryComponent(solute, sys, 'solute');
    return cascade(sys.model, tempIn(sys, T), s.feed, s.solvent, n, i).recovery;
  });
}

/**
 * Number of counter-current equilibrium stages for a target solute recovery, as a real number:
 * between whole stage counts the unrecovered share (1 - recovery) is interpolated geometrically.
 * #N/A, with the recovery reached, when the cascade cannot reach the target within maxStages.
 * @customfunction
 * @helpurl https://localhost:3000/help/TSTAGES.html
 * @param target Target recovery, strictly between 0 and 1.
 * @param feed Feed composition: a range of two cells (x_B, x_C) or three (x_A, x_B, x_C).
 * @param solvent Solvent composition: a range of two or three cells, as the feed.
 * @param amounts Solvent-to-feed ratio (one number, moles of solvent per mole of feed), or a range of two: feed and solvent amounts.
 * @param solute The solute: "A", "B", "C" or the card's component name.
 * @param T Temperature (kelvin, or the card's temperature unit).
 * @param params Ternary parameter card (key/value range).
 * @param [maxStages] Most stages to try (whole number, 1 to 100; default 50).
 * @returns Number of stages (real, at least 0).
 */
export function tStages(target: number, feed: any[][], solvent: any[][], amounts: any[][], solute: string, T: number, params: any[][], maxStages?: number): number {
  return tcell(params, (sys) => {
    const goal = number(target, 'target');
    if (!(goal > 0 && goal < 1)) throw new CellFailure('#NUM!', `target = ${goal}: give a recovery strictly between 0 and 1 (0.99 for 99 %)`);
    const s = streams(feed, solvent, amounts);
    const i = ternaryComponent(solute, sys, 'solute');
    const most = isEmpty(maxStages) ? MAX_STAGES : stageCount(maxStages, 'maxStages');
    return stagesFor(sys.model, tempIn(sys, T), s.feed, s.solvent, i, goal, most).stages;
  });
}

// ---------------------------------------------------------------------------------------------
// Arguments

const part = (x: TernaryPoint, i: 0 | 1 | 2) => (i === 0 ? x.xA : i === 1 ? x.xB : x.xC);

/** A stream's composition: a range of two or three cells (edges allowed: a pure solvent). */
function streamComposition(value: unknown, what: string): TernaryPoint {
  if (toGrid(value).flat().length < 2) {
    throw new CellFailure('#VALUE!', `the ${what} is one cell: give its composition as a range of two cells (x_B, x_C) or three (x_A, x_B, x_C)`);
  }
  return composition(value, undefined, what, true);
}

/** Feed and solvent streams from their compositions and the amounts argument. */
function streams(feed: unknown, solvent: unknown, amounts: unknown): { feed: Stream; solvent: Stream } {
  const zF = streamComposition(feed, 'feed'), zS = streamComposition(solvent, 'solvent');
  const cells = toGrid(amounts).flat().filter((v) => !isEmpty(v));
  let F: number, S: number;
  if (cells.length === 1) {
    F = 1;
    S = gridNumber(cells[0], 'amounts', 'give the solvent-to-feed ratio as a number, or a range of two: feed and solvent amounts');
    if (!(S > 0)) throw new CellFailure('#NUM!', `the solvent-to-feed ratio = ${S}: give a positive number (moles of solvent per mole of feed)`);
  } else if (cells.length === 2) {
    F = gridNumber(cells[0], 'amounts, cell 1 (feed)');
    S = gridNumber(cells[1], 'amounts, cell 2 (solvent)');
    if (!(F > 0 && S > 0)) throw new CellFailure('#NUM!', `the amounts of feed (${F}) and solvent (${S}) must both be positive`);
  } else {
    throw new CellFailure('#VALUE!', `amounts holds ${cells.length} values: give one (the solvent-to-feed ratio) or two (feed and solvent amounts)`);
  }
  return { feed: { amount: F, x: zF }, solvent: { amount: S, x: zS } };
}

/** A whole number of stages from 1 to 100. */
function stageCount(value: unknown, name = 'N'): number {
  const n = number(value, name);
  if (!(Number.isInteger(n) && n >= 1 && n <= 100)) throw new CellFailure('#NUM!', `${name} = ${n}: give a whole number of stages from 1 to 100`);
  return n;
}
