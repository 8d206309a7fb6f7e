/**
 * Standard uncertainties of results, from a parameter card that carries u() and r() rows
 * (./card.ts): linear propagation of the parameters' covariance through any one-cell binary
 * function (src/core/fit/propagation.ts `propagateOver`). The function itself is called with the
 * card's parameters moved (`moved`, taken by `system()` in place of the card), so every function
 * that reads a card gets its uncertainty without a line of its own here.
 *
 * Repeating parameters are not supported by the embedded engine (src/hosts/engine.ts), so
 * UNCERTAINTY takes the function's arguments as five optional ones.
 */
import { MixgapError } from '../core/errors';
import { evenTemperatures } from '../core/gapTable';
import { propagateOver } from '../core/fit/propagation';
import { asFailure, cell, cellOf, number, ordinal, system, temperatureIn, type System } from './args';
import { moved } from './card';
import { isEmpty } from './cells';
import { CellFailure, type CellErrorCode } from './errors';
import {
  actCoef, activity, chemPot, decompGain, driveForce, gapHigh, gapLow, gExcess, gMix, phaseFrac, spinHigh, spinLow, tCrit, tGap, xCrit,
} from './functions';
import { GAPTABLE_ROWS } from './shapes';

type CellFunction = (...args: any[]) => unknown;

/** The functions UNCERTAINTY answers for: each with its argument count and where its card goes. */
const TARGETS: Record<string, { fn: CellFunction; arity: number; params: number }> = {
  GAPLOW: { fn: gapLow, arity: 3, params: 1 },
  GAPHIGH: { fn: gapHigh, arity: 3, params: 1 },
  SPINLOW: { fn: spinLow, arity: 3, params: 1 },
  SPINHIGH: { fn: spinHigh, arity: 3, params: 1 },
  TCRIT: { fn: tCrit, arity: 2, params: 0 },
  XCRIT: { fn: xCrit, arity: 2, params: 0 },
  PHASEFRAC: { fn: phaseFrac, arity: 4, params: 2 },
  TGAP: { fn: tGap, arity: 2, params: 1 },
  GMIX: { fn: gMix, arity: 3, params: 2 },
  ACTIVITY: { fn: activity, arity: 4, params: 2 },
  ACTCOEF: { fn: actCoef, arity: 4, params: 2 },
  CHEMPOT: { fn: chemPot, arity: 4, params: 2 },
  GEXCESS: { fn: gExcess, arity: 3, params: 2 },
  DRIVEFORCE: { fn: driveForce, arity: 3, params: 2 },
  DECOMPGAIN: { fn: decompGain, arity: 3, params: 2 },
};

/** Functions whose results are counts, words or tables: why they have no standard uncertainty. */
const REFUSED: Record<string, string> = {
  GAPCOUNT: 'a count has no standard uncertainty',
  CRITCOUNT: 'a count has no standard uncertainty',
  CRITKIND: 'a word has no standard uncertainty',
  CHECKCARD: 'a description has no standard uncertainty',
  GAPTABLE: 'GAPBAND gives a gap table with its band',
};

/** The band, in standard uncertainties, within which a result must exist and be nearly linear. */
const BAND = 2;

/** The CellFailure behind what a cell function threw (its host's error object included). */
function failureOf(e: unknown): CellFailure {
  if (e instanceof CellFailure) return e;
  const code = (e as { code?: unknown } | null)?.code;
  const byCode: Record<string, CellErrorCode> = {
    '#N/A': '#N/A', notAvailable: '#N/A', '#NUM!': '#NUM!', invalidNumber: '#NUM!', '#VALUE!': '#VALUE!', invalidValue: '#VALUE!',
  };
  // Excel's CustomFunctions.Error carries the code ('#N/A', ...) and the message, and need not be an Error.
  if (typeof code === 'string' && byCode[code]) return new CellFailure(byCode[code], String((e as { message?: unknown }).message ?? ''));
  return asFailure(e);
}

/** A 1 x 1 range as its one value (a matrix parameter receives a single cell as [[v]]). */
function unwrap(v: unknown): unknown {
  if (Array.isArray(v) && v.length === 1 && Array.isArray(v[0]) && v[0].length === 1) return isEmpty(v[0][0]) ? undefined : v[0][0];
  return v;
}

/** The card's System, refused when it carries no uncertainties. */
function uncertainSystem(params: unknown): System & Required<Pick<System, 'uncertainty'>> {
  const sys = system(params);
  if (!sys.uncertainty) throw new CellFailure('#VALUE!', 'the card carries no uncertainties: add u(...) rows or use the card a fit returns');
  return sys as System & Required<Pick<System, 'uncertainty'>>;
}

/**
 * u of `fn(...args)` over the card's covariance, the card at argument `at`; `k` is the band.
 * A result that stops existing or is far from linear within the band is #N/A with the reason.
 */
function uncertaintyOf(sys: System & Required<Pick<System, 'uncertainty'>>, fn: CellFunction, args: unknown[], at: number, what: string, value: number, k = BAND): number {
  const result = (values: Record<string, number>): number => {
    let r: unknown;
    try {
      const withMoved = args.slice();
      withMoved[at] = moved(sys, values);
      r = fn(...withMoved);
    } catch (e) {
      throw new MixgapError('none', e instanceof MixgapError ? e.message : failureOf(e).message);
    }
    if (typeof r !== 'number') throw new MixgapError('input', `${what} is not a number, so it has no standard uncertainty`);
    return r;
  };
  try {
    return propagateOver(sys.uncertainty, result, what, k, value).sigma;
  } catch (e) {
    if (e instanceof MixgapError && e.reason === 'range') throw new CellFailure('#N/A', e.message);
    throw e;
  }
}

/**
 * Standard uncertainty (k = 1) of the result of another Mixgap function, from a parameter card
 * that carries u() and r() rows: linear propagation of the parameters' covariance. #N/A where the
 * result stops existing or is far from linear within 2 standard uncertainties (near a critical
 * point, or where the gap closes).
 * @customfunction
 * @helpurl https://localhost:3000/help/UNCERTAINTY.html
 * @param name Name of the function, such as "GAPLOW" or "TCRIT" (with or without MIXGAP.).
 * @param arg1 Its first argument.
 * @param [arg2] Its second argument, if any.
 * @param [arg3] Its third argument, if any.
 * @param [arg4] Its fourth argument, if any.
 * @param [arg5] Its fifth argument, if any.
 * @returns Standard uncertainty in the unit of the function's result (the card's temperature unit for TCRIT and TGAP).
 */
export function uncertainty(name: string, arg1: any[][], arg2?: any[][], arg3?: any[][], arg4?: any[][], arg5?: any[][]): number {
  return cell(() => {
    const id = typeof name === 'string' ? name.trim().toUpperCase().replace(/^MIXGAP\./, '') : '';
    const target = TARGETS[id];
    if (!target) {
      const why = REFUSED[id] ? `: ${REFUSED[id]}` : '';
      const shown = typeof name === 'string' ? `"${name}"` : JSON.stringify(name ?? '');
      throw new CellFailure('#VALUE!', `name ${shown} is not a function UNCERTAINTY answers for${why}; write one of ${Object.keys(TARGETS).join(', ')}`);
    }
    const args = [arg1, arg2, arg3, arg4, arg5].map(unwrap);
    while (args.length > 0 && args[args.length - 1] === undefined) args.pop();
    if (args.length > target.arity) throw new CellFailure('#VALUE!', `${id} takes at most ${target.arity} arguments, ${args.length} were given after its name`);
    if (args.length <= target.params) throw new CellFailure('#VALUE!', `${id} needs its parameter card as argument ${target.params + 1} (after the name): give ${id}'s own arguments in its own order`);
    const sys = uncertainSystem(args[target.params]);
    let value: unknown;
    try {
      value = target.fn(...args); // the function's own failure (no gap at T, bad x, ...) comes first, as it is
    } catch (e) {
      throw failureOf(e);
    }
    if (typeof value !== 'number') throw new CellFailure('#VALUE!', `${id} gives no number here, so it has no standard uncertainty`);
    return uncertaintyOf(sys, target.fn, args, target.params, id, value);
  });
}

/**
 * A gap table with its band, for charts: columns T, low boundary, low - k u, low + k u, high
 * boundary, high - k u, high + k u (u the standard uncertainty of each boundary from the card's
 * u() and r() rows); one row per temperature, evenly spaced from T1 to T2. #N/A where a boundary,
 * or its band, is not defined (no gap, or a gap that closes within the band).
 * @customfunction
 * @helpurl https://localhost:3000/help/GAPBAND.html
 * @param T1 First temperature (kelvin, or the card's temperature unit).
 * @param T2 Last temperature (kelvin, or the card's temperature unit).
 * @param rows Number of rows (2 to 10000); write it as a number in the formula.
 * @param params Parameter card with u() (and r()) rows.
 * @param [k] Band half-width in standard uncertainties (default 2).
 * @param [gap] Which gap, numbered from low x at each temperature (default 1).
 * @returns rows x 7 table: T, low, low - k u, low + k u, high, high - k u, high + k u.
 */
export function gapBand(T1: number, T2: number, rows: number, params: any[][], k?: number, gap?: number): any[][] {
  return cell(() => {
    const sys = uncertainSystem(params);
    temperatureIn(sys, T1, 'T1');
    temperatureIn(sys, T2, 'T2');
    const n = number(rows, 'rows');
    if (!(Number.isInteger(n) && n >= GAPTABLE_ROWS.min && n <= GAPTABLE_ROWS.max)) {
      throw new CellFailure('#NUM!', `rows = ${n}: give a whole number of rows from ${GAPTABLE_ROWS.min} to ${GAPTABLE_ROWS.max}`);
    }
    const kk = isEmpty(k) ? 2 : number(k, 'k');
    if (!(kk > 0)) throw new CellFailure('#NUM!', `k = ${kk}: give the band's half-width as a positive number of standard uncertainties`);
    const which = ordinal(gap, 'gap');
    const grid = evenTemperatures(number(T1, 'T1'), number(T2, 'T2'), n);
    return grid.map((t) => {
      const row: unknown[] = [t];
      for (const fn of [gapLow, gapHigh]) {
        let x: number;
        try {
          x = fn(t, params, which);
        } catch (e) {
          const f = failureOf(e);
          row.push(cellOf(f), cellOf(f), cellOf(f));
          continue;
        }
        try {
          const u = uncertaintyOf(sys, fn, [t, params, which], 1, fn === gapLow ? 'the low boundary' : 'the high boundary', x, Math.max(kk, BAND));
          row.push(x, x - kk * u, x + kk * u);
        } catch (e) {
          const f = asFailure(e, sys);
          row.push(x, cellOf(f), cellOf(f));
        }
      }
      return row;
    });
  });
}
